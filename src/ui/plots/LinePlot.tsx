import { line, area, scaleLinear, scaleLog } from 'd3';
import { useId } from 'react';
import { palette } from '../format';
import { PlotExport } from './PlotExport';

export interface Series {
  label: string;
  color: string;
  points: { x: number; y: number }[];
  dash?: string;
}

export interface LinePlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  series: Series[];
  xDomain: [number, number];
  yDomain: [number, number];
  band?: { x: number; lower: number; upper: number }[];
  /** Vertical marker lines (e.g. the cut-off). */
  markers?: { x: number; label: string; color: string }[];
  rug?: number[];
  diagonal?: boolean;
  width?: number;
  height?: number;
  logX?: boolean;
}

const M = { top: 12, right: 12, bottom: 40, left: 52 };

/** A d3-scaled line chart rendered as React SVG from plain data. */
export function LinePlot(p: LinePlotProps) {
  const width = p.width ?? 380;
  const height = p.height ?? 280;
  const id = useId();
  const x = (p.logX ? scaleLog() : scaleLinear())
    .domain(p.xDomain)
    .range([M.left, width - M.right])
    .clamp(true);
  const y = scaleLinear()
    .domain(p.yDomain)
    .range([height - M.bottom, M.top])
    .clamp(true);
  const path = line<{ x: number; y: number }>()
    .x((d) => x(d.x))
    .y((d) => y(d.y))
    .defined((d) => Number.isFinite(d.x) && Number.isFinite(d.y));
  const bandPath = p.band
    ? area<{ x: number; lower: number; upper: number }>()
        .defined((d) => Number.isFinite(d.lower) && Number.isFinite(d.upper))
        .x((d) => x(d.x))
        .y0((d) => y(d.lower))
        .y1((d) => y(d.upper))(p.band)
    : null;
  const xt = x.ticks(5),
    yt = y.ticks(5);
  const fmtX = x.tickFormat(5),
    fmtY = y.tickFormat(5);
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <defs>
          <clipPath id={`${id}-c`}>
            <rect x={M.left} y={M.top} width={width - M.left - M.right} height={height - M.top - M.bottom} />
          </clipPath>
        </defs>
        {yt.map((t) => (
          <line key={`gy${t}`} x1={M.left} x2={width - M.right} y1={y(t)} y2={y(t)} className="grid" />
        ))}
        {xt.map((t) => (
          <g key={`x${t}`}>
            <line x1={x(t)} x2={x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {fmtX(t)}
            </text>
          </g>
        ))}
        {yt.map((t) => (
          <text key={`y${t}`} x={M.left - 6} y={y(t) + 4} textAnchor="end" className="tick">
            {fmtY(t)}
          </text>
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
        <g clipPath={`url(#${id}-c)`}>
          {p.diagonal && (
            <line
              x1={x(p.xDomain[0])}
              y1={y(p.yDomain[0])}
              x2={x(p.xDomain[1])}
              y2={y(p.yDomain[1])}
              stroke={palette.grey}
              strokeDasharray="4 4"
            />
          )}
          {bandPath && <path d={bandPath} fill={palette.sky} opacity={0.3} />}
          {p.series.map((s) => (
            <path
              key={s.label}
              d={path(s.points) ?? ''}
              fill="none"
              stroke={s.color}
              strokeWidth={2}
              strokeDasharray={s.dash}
            />
          ))}
          {p.markers?.map((m) => (
            <line
              key={m.label}
              x1={x(m.x)}
              x2={x(m.x)}
              y1={M.top}
              y2={height - M.bottom}
              stroke={m.color}
              strokeWidth={2}
              strokeDasharray="5 3"
            />
          ))}
          {p.rug?.map((r, i) => (
            <line
              key={i}
              x1={x(r)}
              x2={x(r)}
              y1={height - M.bottom}
              y2={height - M.bottom - 6}
              stroke="#333"
              opacity={0.35}
            />
          ))}
        </g>
      </svg>
      <figcaption className="legend">
        {p.series.map((s) => (
          <span key={s.label}>
            <svg width="18" height="8" aria-hidden="true">
              <line x1="0" x2="18" y1="4" y2="4" stroke={s.color} strokeWidth="2" strokeDasharray={s.dash} />
            </svg>{' '}
            {s.label}
          </span>
        ))}
        {p.markers?.map((m) => (
          <span key={m.label}>
            <svg width="18" height="8" aria-hidden="true">
              <line x1="0" x2="18" y1="4" y2="4" stroke={m.color} strokeWidth="2" strokeDasharray="5 3" />
            </svg>{' '}
            {m.label}
          </span>
        ))}
      </figcaption>
      <PlotExport title={p.title} />
    </figure>
  );
}
