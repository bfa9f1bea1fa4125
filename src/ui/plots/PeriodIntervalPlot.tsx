import { scaleBand, scaleLinear } from 'd3';
import { useId } from 'react';
import { palette } from '../format';
import { PlotExport } from './PlotExport';
import { YGrid } from './YGrid';

export interface PeriodIntervalPlotProps {
  title: string;
  yLabel: string;
  /** One estimate per period, oldest first, with its interval (null: none). */
  points: { label: string; y: number | null; lower: number | null; upper: number | null }[];
  /** The value that means "as the model expects" (1 for O/E, 0 for calibration-in-the-large). */
  reference: number;
  /** Limits of the y axis: intervals beyond them are cut at the edge. */
  yClamp: [number, number];
  width?: number;
  height?: number;
}

const M = { top: 12, right: 12, bottom: 48, left: 52 };

/** An estimate with its interval for each period, against the value the model expects (drift over time). */
export function PeriodIntervalPlot(p: PeriodIntervalPlotProps) {
  const width = p.width ?? 440;
  const height = p.height ?? 260;
  const id = useId();
  const vals = p.points.flatMap((d) => [d.y, d.lower, d.upper]).filter((v): v is number => v !== null);
  const lo = Math.max(p.yClamp[0], Math.min(p.reference, ...vals));
  const hi = Math.min(p.yClamp[1], Math.max(p.reference, ...vals));
  const y = scaleLinear()
    .domain([lo, hi > lo ? hi : lo + 1])
    .range([height - M.bottom, M.top])
    .nice()
    .clamp(true);
  const x = scaleBand()
    .domain(p.points.map((d) => d.label))
    .range([M.left, width - M.right])
    .padding(0.3);
  const mid = (l: string) => (x(l) ?? 0) + x.bandwidth() / 2;
  const every = Math.max(1, Math.ceil(p.points.length / 8));
  const yt = y.ticks(5);
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <YGrid ticks={yt} y={y} left={M.left} right={width - M.right} label={y.tickFormat(5)} />
        {p.points.map((d, i) =>
          i % every === 0 ? (
            <text key={d.label} x={mid(d.label)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {d.label}
            </text>
          ) : null,
        )}
        <line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#333" />
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#333" />
        <text x={(M.left + width - M.right) / 2} y={height - 8} textAnchor="middle" className="axis-label">
          Period
        </text>
        <text
          transform={`translate(14 ${(M.top + height - M.bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          className="axis-label"
        >
          {p.yLabel}
        </text>
        <line
          x1={M.left}
          x2={width - M.right}
          y1={y(p.reference)}
          y2={y(p.reference)}
          stroke={palette.grey}
          strokeDasharray="4 4"
        />
        {p.points.map((d) => (
          <g key={d.label}>
            {d.lower !== null && d.upper !== null && (
              <line
                x1={mid(d.label)}
                x2={mid(d.label)}
                y1={y(d.lower)}
                y2={y(d.upper)}
                stroke={palette.orange}
                strokeWidth={2}
              />
            )}
            {d.y !== null && <circle cx={mid(d.label)} cy={y(d.y)} r={3.5} fill={palette.blue} />}
          </g>
        ))}
      </svg>
      <PlotExport title={p.title} />
    </figure>
  );
}
