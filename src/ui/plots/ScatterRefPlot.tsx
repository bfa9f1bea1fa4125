import { scaleLinear } from 'd3';
import { useId, type ReactElement } from 'react';
import { palette } from '../format';
import { PlotExport } from './PlotExport';
import { YGrid } from './YGrid';

/** A reference line of a scatter plot, labelled by its rule. */
export interface RefLine {
  axis: 'x' | 'y';
  value: number;
  label: string;
  color: string;
}

export interface ScatterRefPlotProps {
  title: string;
  xLabel: string;
  yLabel: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Indices of points drawn large and labelled (`labels[k]` for `marked[k]`). */
  marked: number[];
  labels: string[];
  lines: RefLine[];
  xDomain: [number, number];
  yDomain: [number, number];
  width?: number;
  height?: number;
}

const M = { top: 12, right: 16, bottom: 40, left: 56 };

/** Points with labelled reference lines (the diagnostics plots); the marked points carry their labels. */
export function ScatterRefPlot(p: ScatterRefPlotProps) {
  const width = p.width ?? 460;
  const height = p.height ?? 300;
  const id = useId();
  const x = scaleLinear()
    .domain(p.xDomain)
    .range([M.left, width - M.right])
    .nice();
  const y = scaleLinear()
    .domain(p.yDomain)
    .range([height - M.bottom, M.top])
    .nice();
  const xt = x.ticks(5),
    yt = y.ticks(5);
  const fx = x.tickFormat(5),
    fy = y.tickFormat(5);
  const inX = (v: number) => v >= x.domain()[0] && v <= x.domain()[1];
  const inY = (v: number) => v >= y.domain()[0] && v <= y.domain()[1];
  const dots: ReactElement[] = [];
  const marked = new Set(p.marked);
  for (let i = 0; i < p.x.length; i++) {
    if (marked.has(i) || !Number.isFinite(p.x[i]) || !Number.isFinite(p.y[i])) continue;
    dots.push(<circle key={i} cx={x(p.x[i])} cy={y(p.y[i])} r={1.6} fill={palette.blue} opacity={0.45} />);
  }
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <defs>
          <clipPath id={`${id}-c`}>
            <rect x={M.left} y={M.top} width={width - M.left - M.right} height={height - M.top - M.bottom} />
          </clipPath>
        </defs>
        <YGrid ticks={yt} y={y} left={M.left} right={width - M.right} label={fy} />
        {xt.map((t) => (
          <text key={`x${t}`} x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
            {fx(t)}
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
          {dots}
          {p.lines
            .filter((l) => (l.axis === 'x' ? inX(l.value) : inY(l.value)))
            .map((l) =>
              l.axis === 'x' ? (
                <g key={l.label}>
                  <line
                    x1={x(l.value)}
                    x2={x(l.value)}
                    y1={M.top}
                    y2={height - M.bottom}
                    stroke={l.color}
                    strokeDasharray="5 3"
                  />
                  <text x={x(l.value) + 3} y={M.top + 10} className="tick" fill={l.color}>
                    {l.label}
                  </text>
                </g>
              ) : (
                <g key={l.label}>
                  <line
                    x1={M.left}
                    x2={width - M.right}
                    y1={y(l.value)}
                    y2={y(l.value)}
                    stroke={l.color}
                    strokeDasharray="5 3"
                  />
                  <text x={width - M.right - 3} y={y(l.value) - 3} textAnchor="end" className="tick" fill={l.color}>
                    {l.label}
                  </text>
                </g>
              ),
            )}
          {p.marked.map((i, k) =>
            Number.isFinite(p.x[i]) && Number.isFinite(p.y[i]) ? (
              <g key={`m${i}`}>
                <circle cx={x(p.x[i])} cy={y(p.y[i])} r={4} fill={palette.vermillion} />
                <text x={x(p.x[i]) + 6} y={y(p.y[i]) + 4} className="tick">
                  {p.labels[k]}
                </text>
              </g>
            ) : null,
          )}
        </g>
      </svg>
      <PlotExport title={p.title} />
    </figure>
  );
}
