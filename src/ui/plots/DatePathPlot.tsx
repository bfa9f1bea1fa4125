import { line, scaleLinear, scaleUtc } from 'd3';
import { useId } from 'react';
import type { DrawPath } from '../../engine/monitoring';
import { palette } from '../format';
import { PlotExport } from './PlotExport';
import { YGrid } from './YGrid';

export interface DatePathPlotProps {
  title: string;
  yLabel: string;
  /** The path to draw (already decimated by the engine for drawing; nothing is computed here). */
  path: DrawPath;
  color: string;
  /** First and last date (epoch days) of the x axis. */
  range: [number, number];
  /** A horizontal limit (e.g. the CUSUM's h) with its label. */
  limit?: { y: number; label: string };
  /** Points to mark (e.g. CUSUM signals), at full resolution. */
  marks?: { date: number; value: number; label: string }[];
  width?: number;
  height?: number;
}

const M = { top: 12, right: 16, bottom: 40, left: 52 };
const DAY = 86_400_000;

/** A path over calendar time (CUSUM, cumulative O − E) with an optional limit line and marked points. */
export function DatePathPlot(p: DatePathPlotProps) {
  const width = p.width ?? 320;
  const height = p.height ?? 240;
  const id = useId();
  const x = scaleUtc()
    .domain([new Date(p.range[0] * DAY), new Date(Math.max(p.range[1], p.range[0] + 1) * DAY)])
    .range([M.left, width - M.right]);
  let lo = 0;
  let hi = 0;
  for (const v of p.path.value) if (Number.isFinite(v)) [lo, hi] = [Math.min(lo, v), Math.max(hi, v)];
  if (p.limit) [lo, hi] = [Math.min(lo, p.limit.y * 1.12), Math.max(hi, p.limit.y * 1.12)];
  if (hi - lo < 1e-9) hi = lo + 1;
  const y = scaleLinear()
    .domain([lo, hi])
    .range([height - M.bottom, M.top])
    .nice();
  const xOf = (d: number) => x(new Date(d * DAY));
  const d =
    line<number>()
      .x((i) => xOf(p.path.date[i]))
      .y((i) => y(p.path.value[i]))
      .defined((i) => Number.isFinite(p.path.value[i]))(p.path.value.map((_, i) => i)) ?? '';
  const xt = x.ticks(5);
  const fmtX = x.tickFormat(5, '%b %Y');
  const yt = y.ticks(5);
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <YGrid ticks={yt} y={y} left={M.left} right={width - M.right} label={y.tickFormat(5)} />
        {xt.map((t) => (
          <g key={`x${t.getTime()}`}>
            <line x1={x(t)} x2={x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {fmtX(t)}
            </text>
          </g>
        ))}
        <line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#333" />
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#333" />
        <text x={(M.left + width - M.right) / 2} y={height - 6} textAnchor="middle" className="axis-label">
          Date
        </text>
        <text
          transform={`translate(14 ${(M.top + height - M.bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          className="axis-label"
        >
          {p.yLabel}
        </text>
        <line x1={M.left} x2={width - M.right} y1={y(0)} y2={y(0)} stroke={palette.grey} />
        {p.limit && (
          <g>
            <line
              x1={M.left}
              x2={width - M.right}
              y1={y(p.limit.y)}
              y2={y(p.limit.y)}
              stroke={palette.vermillion}
              strokeDasharray="6 3"
              strokeWidth={1.5}
            />
            <text
              x={width - M.right - 4}
              y={y(p.limit.y) + (p.limit.y >= 0 ? -5 : 13)}
              textAnchor="end"
              className="tick"
              fill={palette.vermillion}
            >
              {p.limit.label}
            </text>
          </g>
        )}
        <path d={d} fill="none" stroke={p.color} strokeWidth={1.3} />
        {p.marks?.map((m) => (
          <circle
            key={`${m.date}-${m.label}`}
            cx={xOf(m.date)}
            cy={y(m.value)}
            r={4.5}
            fill={palette.vermillion}
            stroke="#fff"
            data-testid="path-mark"
          >
            <title>{m.label}</title>
          </circle>
        ))}
      </svg>
      <PlotExport title={p.title} />
    </figure>
  );
}
