import type { ColumnView } from '../../worker/protocol';
import { palette } from '../format';

/** Tiny histogram / level-count bars for a column header; the numbers are in its title. */
export function Sparkline({ col }: { col: ColumnView }) {
  const bins = col.bins.slice(0, 20);
  const max = Math.max(1, ...bins.map((b) => b.count));
  const w = 64,
    h = 18,
    bw = w / Math.max(1, bins.length);
  const text = bins.map((b) => `${b.label}: ${b.count}`).join('; ');
  return (
    <svg width={w} height={h} role="img" aria-label={`Distribution of ${col.name}: ${text}`}>
      <title>{text}</title>
      {bins.map((b, i) => (
        <rect
          key={i}
          x={i * bw + 0.5}
          y={h - (h * b.count) / max}
          width={Math.max(1, bw - 1)}
          height={(h * b.count) / max}
          fill={col.kind === 'numeric' ? palette.blue : palette.orange}
        />
      ))}
    </svg>
  );
}
