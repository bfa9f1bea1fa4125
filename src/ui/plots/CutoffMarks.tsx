import type { ScaleLinear } from 'd3';
import { palette, pct } from '../format';

/** One cut-off drawn on a plot of the cut-off view. */
export interface CutoffMark {
  key: 'current' | 'cost-based' | 'cheapest';
  x: number;
  label: string;
  color: string;
  /** SVG dash pattern; '' draws a solid line. */
  dash: string;
}

/** The current, cost-based and cheapest cut-offs, each with its own colour and dash pattern. */
export function cutoffMarks(current: number, costBased: number | null, cheapest: number | null): CutoffMark[] {
  const marks: CutoffMark[] = [
    { key: 'current', x: current, label: `current ${pct(current)}`, color: palette.vermillion, dash: '' },
  ];
  if (costBased !== null)
    marks.push({
      key: 'cost-based',
      x: costBased,
      label: `cost-based ${pct(costBased)}`,
      color: palette.green,
      dash: '7 3',
    });
  if (cheapest !== null)
    marks.push({
      key: 'cheapest',
      x: cheapest,
      label: `cheapest ${pct(cheapest)}`,
      color: palette.purple,
      dash: '2 2',
    });
  return marks;
}

/** Horizontal gap (px) kept between lines that would otherwise coincide. */
export const MARK_GAP = 4;

/**
 * Pixel positions of the marks: each at its value, clamped to [left, right]; a line that would fall within
 * MARK_GAP of one already placed is moved aside by MARK_GAP, so coinciding cut-offs stay side by side.
 */
export function placeMarks(px: number[], left: number, right: number): number[] {
  const placed: number[] = [];
  for (const p0 of px) {
    let p = Math.min(right, Math.max(left, p0));
    const dir = p > (left + right) / 2 ? -1 : 1;
    while (placed.some((q) => Math.abs(q - p) < MARK_GAP - 1e-9)) p += dir * MARK_GAP;
    placed.push(p);
  }
  return placed;
}

/** Rows of label text above the plot area, one per mark, so labels of coinciding lines never overlap. */
export const MARK_ROW = 13;

/**
 * The marks as vertical lines from `top` to `bottom`, each with its label on a row of its own above `top`. A mark
 * off the drawn range sits at the edge with an arrow in its label.
 */
export function MarkLines(p: {
  marks: CutoffMark[];
  x: ScaleLinear<number, number>;
  top: number;
  bottom: number;
  plot: string;
}) {
  const [d0, d1] = p.x.domain();
  const [left, right] = p.x.range();
  const px = placeMarks(
    p.marks.map((m) => p.x(m.x)),
    left,
    right,
  );
  return (
    <g className="cutoff-marks">
      {p.marks.map((m, i) => {
        const off = m.x < d0 ? ' ◀' : m.x > d1 ? ' ▶' : '';
        const rowY = p.top - 4 - (p.marks.length - 1 - i) * MARK_ROW;
        const anchor = px[i] > (left + right) / 2 ? 'end' : 'start';
        return (
          <g key={m.key} data-testid={`${p.plot}-mark-${m.key}`} data-px={px[i].toFixed(1)}>
            <line
              x1={px[i]}
              x2={px[i]}
              y1={rowY + 3}
              y2={p.bottom}
              stroke={m.color}
              strokeWidth={2}
              strokeDasharray={m.dash || undefined}
            />
            <text
              x={px[i] + (anchor === 'start' ? 3 : -3)}
              y={rowY}
              textAnchor={anchor}
              className="tick"
              fill={m.color}
              style={{ fill: m.color, fontWeight: 600 }}
            >
              {m.label}
              {off && ` (off the scale${off})`}
            </text>
          </g>
        );
      })}
    </g>
  );
}

/** The legend of the marks: colour and dash pattern of each line. */
export function MarkLegend({ marks }: { marks: CutoffMark[] }) {
  return (
    <>
      {marks.map((m) => (
        <span key={m.key}>
          <svg width="22" height="8" aria-hidden="true">
            <line x1="0" x2="22" y1="4" y2="4" stroke={m.color} strokeWidth="2" strokeDasharray={m.dash || undefined} />
          </svg>{' '}
          {m.label}
        </span>
      ))}
    </>
  );
}
