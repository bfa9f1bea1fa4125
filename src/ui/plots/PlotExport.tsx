import { useRef } from 'react';
import { notify } from '../../state/actions';
import { useEnv } from '../context';
import { downloadFile } from '../download';
import { svgToPngBlob, svgToString } from '../plotExport';

/** "fulcra-roc-curve-2026-12-02.svg": the plot's title, made safe for a file name. */
export function plotFileName(title: string, ext: 'svg' | 'png', date = new Date()): string {
  const stem =
    title
      .toLowerCase()
      .replace(/[^\p{L}\p{N}]+/gu, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 50) || 'plot';
  return `fulcra-${stem}-${date.toISOString().slice(0, 10)}.${ext}`;
}

/** Save-as-SVG and save-as-PNG buttons for the plot in the same <figure> (its first <svg>). */
export function PlotExport({ title }: { title: string }) {
  const { store } = useEnv();
  const ref = useRef<HTMLDivElement>(null);
  const svg = () => ref.current?.closest('figure')?.querySelector<SVGSVGElement>(':scope > svg') ?? null;
  const fail = (err: unknown) =>
    store.apply(notify, { kind: 'error', text: `The plot “${title}” could not be saved (${(err as Error).message}).` });
  const asSvg = () => {
    const el = svg();
    if (!el) return;
    try {
      downloadFile(svgToString(el), plotFileName(title, 'svg'), 'image/svg+xml');
    } catch (err) {
      fail(err);
    }
  };
  const asPng = async () => {
    const el = svg();
    if (!el) return;
    try {
      const blob = await svgToPngBlob(el, 2);
      downloadFile(new Uint8Array(await blob.arrayBuffer()), plotFileName(title, 'png'), 'image/png');
    } catch (err) {
      fail(err);
    }
  };
  return (
    <div className="plot-export" ref={ref} role="group" aria-label={`Save the plot: ${title}`}>
      <button type="button" aria-label={`Save ${title} as SVG`} onClick={asSvg}>
        SVG
      </button>
      <button type="button" aria-label={`Save ${title} as PNG`} onClick={() => void asPng()}>
        PNG
      </button>
    </div>
  );
}
