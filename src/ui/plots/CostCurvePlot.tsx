import { line, scaleLinear } from 'd3';
import { useId } from 'react';
import type { CurvePoint } from '../../worker/protocol';
import { finiteMax, num, palette, pct } from '../format';
import { MARK_ROW, MarkLegend, MarkLines, type CutoffMark } from './CutoffMarks';
import { NumbersTable } from './NumbersTable';
import { PlotExport } from './PlotExport';
import { YGrid } from './YGrid';

const M = { right: 18, bottom: 40, left: 52 };

/** Expected cost per 100 cases against the cut-off, with the cut-offs drawn as labelled, dashed lines. */
export function CostCurvePlot(p: {
  title: string;
  curve: CurvePoint[];
  domain: [number, number];
  marks: CutoffMark[];
  width?: number;
  height?: number;
}) {
  const id = useId();
  const width = p.width ?? 420;
  const height = p.height ?? 260;
  const top = 10 + p.marks.length * MARK_ROW;
  const x = scaleLinear()
    .domain(p.domain)
    .range([M.left, width - M.right]);
  const inside = p.curve.filter((q) => q.x >= p.domain[0] && q.x <= p.domain[1]);
  const y = scaleLinear()
    .domain([
      0,
      finiteMax(
        inside.map((q) => q.y),
        1,
      ) * 1.05 || 1,
    ])
    .range([height - M.bottom, top])
    .nice();
  const path = line<CurvePoint>()
    .x((d) => x(d.x))
    .y((d) => y(d.y))
    .defined((d) => Number.isFinite(d.y))(inside);
  const xt = x.ticks(5);
  const yt = y.ticks(5);
  const fmtX = (v: number) => pct(v, p.domain[1] - p.domain[0] < 0.05 ? 1 : 0);
  return (
    <figure className="plot cost-curve" data-testid="cost-curve">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <YGrid ticks={yt} y={y} left={M.left} right={width - M.right} label={(t) => num(t, t % 1 === 0 ? 0 : 1)} />
        {xt.map((t) => (
          <g key={`x${t}`}>
            <line x1={x(t)} x2={x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {fmtX(t)}
            </text>
          </g>
        ))}
        <line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#333" />
        <line x1={M.left} x2={M.left} y1={top} y2={height - M.bottom} stroke="#333" />
        <text x={(M.left + width - M.right) / 2} y={height - 6} textAnchor="middle" className="axis-label">
          Probability cut-off
        </text>
        <text
          transform={`translate(14 ${(top + height - M.bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          className="axis-label"
        >
          Expected cost per 100 cases
        </text>
        <path d={path ?? ''} fill="none" stroke={palette.blue} strokeWidth={2} />
        <MarkLines marks={p.marks} x={x} top={top} bottom={height - M.bottom} plot="cost" />
      </svg>
      <figcaption className="legend">
        <span>
          <svg width="22" height="8" aria-hidden="true">
            <line x1="0" x2="22" y1="4" y2="4" stroke={palette.blue} strokeWidth="2" />
          </svg>{' '}
          expected cost per 100
        </span>
        <MarkLegend marks={p.marks} />
      </figcaption>
      <NumbersTable
        summary="Expected cost as numbers"
        headers={['Cut-off', 'Cost per 100']}
        rows={inside.map((q) => [
          pct(q.x, p.domain[1] - p.domain[0] < 0.2 ? 2 : p.domain[1] - p.domain[0] < 0.6 ? 1 : 0),
          num(q.y, 2),
        ])}
      />
      <PlotExport title={p.title} />
    </figure>
  );
}
