import { useRef } from 'react';
import type { PointsRecord } from '../../engine/workflow';
import { notify } from '../../state/actions';
import { CARD_HEIGHT, CARD_WIDTH, pointsCardItems } from '../../report/pointsCard';
import { FULCRA_VERSION } from '../../report/version';
import { useEnv } from '../context';
import { downloadFile } from '../download';
import { svgToPngBlob } from '../plotExport';

const PT_TO_MM = 25.4 / 72;
const rgb = (c: [number, number, number] | undefined) => (c ? `rgb(${c.join(',')})` : '#000');

/** The card's file name: "fulcra-points-card-<outcome>-<yyyy-mm-dd>.<ext>". */
export function cardFileName(outcome: string, ext: 'pdf' | 'png', date = new Date()): string {
  const safe = outcome.replace(/[^\p{L}\p{N}_-]+/gu, '_').slice(0, 40) || 'model';
  return `fulcra-points-card-${safe}-${date.toISOString().slice(0, 10)}.${ext}`;
}

/**
 * The one-page card drawn as SVG from the same positioned items the PDF draws (report/pointsCard.ts), with buttons
 * to save it as a PDF (made by the engine worker with jsPDF) and as a PNG (this SVG rasterised, 300 dpi).
 */
export function PointsCardPreview({ points }: { points: PointsRecord }) {
  const { ctl, store } = useEnv();
  const ref = useRef<SVGSVGElement>(null);
  const created = new Date().toISOString();
  const items = pointsCardItems(points, { fulcraVersion: FULCRA_VERSION, created, footer: true });
  const fail = (what: string, err: unknown) =>
    store.apply(notify, { kind: 'error', text: `The card could not be saved as ${what} (${(err as Error).message}).` });
  const asPdf = async () => {
    try {
      const bytes = await ctl.pointsCardPdf();
      if (bytes) downloadFile(bytes, cardFileName(points.score.outcome, 'pdf'), 'application/pdf');
    } catch (err) {
      fail('PDF', err);
    }
  };
  const asPng = async () => {
    if (!ref.current) return;
    try {
      // 2480 px across 210 mm: 300 dots per inch, whatever the preview's size on screen
      const shown = ref.current.getBoundingClientRect().width || 595;
      const blob = await svgToPngBlob(ref.current, Math.min(8, 2480 / shown));
      downloadFile(new Uint8Array(await blob.arrayBuffer()), cardFileName(points.score.outcome, 'png'), 'image/png');
    } catch (err) {
      fail('PNG', err);
    }
  };
  return (
    <figure className="points-card" data-testid="points-card">
      <div className="row" role="group" aria-label="Save the card">
        <button type="button" data-testid="points-card-pdf" onClick={() => void asPdf()}>
          Card as PDF
        </button>{' '}
        <button type="button" data-testid="points-card-png" onClick={() => void asPng()}>
          Card as PNG
        </button>
      </div>
      <svg
        ref={ref}
        xmlns="http://www.w3.org/2000/svg"
        viewBox={`0 0 ${CARD_WIDTH} ${CARD_HEIGHT}`}
        width={595}
        height={842}
        role="img"
        aria-label="Printable bedside points card (the tables above in card form)"
        style={{ background: '#fff', outline: '1px solid #ccc', maxWidth: '100%', height: 'auto' }}
        fontFamily="'Liberation Sans', Arial, Helvetica, sans-serif"
      >
        <rect x={0} y={0} width={CARD_WIDTH} height={CARD_HEIGHT} fill="#fff" />
        {items.map((it, i) =>
          it.kind === 'rect' ? (
            <rect key={i} x={it.x} y={it.y} width={it.w} height={it.h} fill={rgb(it.fill)} />
          ) : it.kind === 'line' ? (
            <line key={i} x1={it.x1} y1={it.y1} x2={it.x2} y2={it.y2} stroke={rgb(it.color)} strokeWidth={it.width} />
          ) : (
            <text
              key={i}
              x={it.x}
              y={it.y}
              fontSize={it.size * PT_TO_MM}
              fontWeight={it.bold ? 'bold' : 'normal'}
              fill={rgb(it.color)}
              textAnchor={it.align === 'right' ? 'end' : 'start'}
            >
              {it.text}
            </text>
          ),
        )}
      </svg>
    </figure>
  );
}
