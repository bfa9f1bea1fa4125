import { scaleBand, scaleLinear } from 'd3';
import { useId } from 'react';
import { palette } from '../format';
import { PlotExport } from './PlotExport';

export interface PointRangePlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  /** One point per named category, with its interval (NaN bounds: no bar). */
  points: { label: string; y: number; lower: number; upper: number }[];
  yDomain: [number, number];
  /** Legend text of the interval bars (none when no point has one). */
  intervalLabel?: string;
  width?: number;
  height?: number;
}

const M = { top: 12, right: 12, bottom: 40, left: 52 };
const ITEM = { display: 'inline-flex', alignItems: 'center', gap: 4 } as const;

/** Points with interval bars at named categories (a band scale): nothing is drawn between the categories. */
export function PointRangePlot(p: PointRangePlotProps) {
  const width = p.width ?? 380;
  const height = p.height ?? 280;
  const id = useId();
  const x = scaleBand()
    .domain(p.points.map((d) => d.label))
    .range([M.left, width - M.right])
    .padding(0.4);
  const y = scaleLinear()
    .domain(p.yDomain)
    .range([height - M.bottom, M.top])
    .clamp(true);
  const mid = (label: string) => (x(label) ?? 0) + x.bandwidth() / 2;
  const yt = y.ticks(5),
    fmtY = y.tickFormat(5);
  const cap = Math.min(8, x.bandwidth() / 4);
  const hasBars = p.points.some((d) => Number.isFinite(d.lower) && Number.isFinite(d.upper));
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        {yt.map((t) => (
          <line key={`gy${t}`} x1={M.left} x2={width - M.right} y1={y(t)} y2={y(t)} className="grid" />
        ))}
        {yt.map((t) => (
          <text key={`y${t}`} x={M.left - 6} y={y(t) + 4} textAnchor="end" className="tick">
            {fmtY(t)}
          </text>
        ))}
        {p.points.map((d) => (
          <g key={d.label} data-testid="category-tick">
            <line x1={mid(d.label)} x2={mid(d.label)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={mid(d.label)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {d.label}
            </text>
          </g>
        ))}
        <line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#333" />
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#333" />
        <text x={(M.left + width - M.right) / 2} y={height - 6} textAnchor="middle" className="axis-label">
          {p.xLabel}
        </text>
        <text
          transform={`translate(14 ${(M.top + height - M.bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          className="axis-label"
        >
          {p.yLabel}
        </text>
        {p.points.map((d) => {
          const cx = mid(d.label);
          const bar = Number.isFinite(d.lower) && Number.isFinite(d.upper);
          return (
            <g key={d.label}>
              {bar && (
                <g stroke={palette.blue} strokeWidth={2}>
                  <line x1={cx} x2={cx} y1={y(d.lower)} y2={y(d.upper)} />
                  <line x1={cx - cap} x2={cx + cap} y1={y(d.lower)} y2={y(d.lower)} />
                  <line x1={cx - cap} x2={cx + cap} y1={y(d.upper)} y2={y(d.upper)} />
                </g>
              )}
              {Number.isFinite(d.y) && <circle cx={cx} cy={y(d.y)} r={4.5} fill={palette.blue} />}
            </g>
          );
        })}
      </svg>
      <figcaption className="legend">
        <span style={ITEM}>
          <svg width="10" height="10" aria-hidden="true">
            <circle cx="5" cy="5" r="4" fill={palette.blue} />
          </svg>{' '}
          predicted risk
        </span>
        {hasBars && p.intervalLabel && (
          <span style={ITEM}>
            <svg width="10" height="12" aria-hidden="true">
              <line x1="5" x2="5" y1="0" y2="12" stroke={palette.blue} strokeWidth="2" />
            </svg>{' '}
            {p.intervalLabel}
          </span>
        )}
      </figcaption>
      <PlotExport title={p.title} />
    </figure>
  );
}
