import { scaleLinear } from 'd3';
import { useId } from 'react';
import type { RiskBins } from '../../worker/protocol';
import { count, palette, pct, plural } from '../format';
import { MARK_ROW, MarkLegend, MarkLines, type CutoffMark } from './CutoffMarks';
import { NumbersTable } from './NumbersTable';
import { PlotExport } from './PlotExport';

const M = { right: 18, bottom: 40, left: 52, gap: 18 };

/**
 * The predicted risks of cases with the event (upper strip) and without it (lower strip) as two histograms on one
 * risk axis, each scaled to its own tallest bar, with the cut-offs drawn across both.
 */
export function RiskHistogram(p: {
  title: string;
  bins: RiskBins;
  domain: [number, number];
  marks: CutoffMark[];
  width?: number;
  height?: number;
}) {
  const id = useId();
  const width = p.width ?? 420;
  const height = p.height ?? 280;
  const top = 10 + p.marks.length * MARK_ROW;
  const x = scaleLinear()
    .domain(p.domain)
    .range([M.left, width - M.right]);
  const stripH = (height - top - M.bottom - M.gap) / 2;
  const { edges, events, nonEvents } = p.bins;
  const strips = [
    { key: 'events', label: 'with the event', counts: events, y0: top, color: palette.vermillion },
    { key: 'non-events', label: 'without the event', counts: nonEvents, y0: top + stripH + M.gap, color: palette.blue },
  ];
  const { below, above } = p.bins;
  const total = (key: string, c: number[]) =>
    c.reduce((a, b) => a + b, 0) + (key === 'events' ? below.events + above.events : below.nonEvents + above.nonEvents);
  const xt = x.ticks(5);
  const fmtX = (v: number) => pct(v, x.domain()[1] - x.domain()[0] < 0.05 ? 1 : 0);
  const outside = below.events + below.nonEvents + above.events + above.nonEvents;
  return (
    <figure className="plot risk-histogram" data-testid="risk-histogram">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        {strips.map((s) => {
          const y = scaleLinear()
            .domain([0, Math.max(1, ...s.counts)])
            .range([s.y0 + stripH, s.y0]);
          return (
            <g key={s.key} data-testid={`strip-${s.key}`}>
              <line x1={M.left} x2={width - M.right} y1={s.y0 + stripH} y2={s.y0 + stripH} stroke="#333" />
              {s.counts.map((c, i) =>
                c > 0 ? (
                  <rect
                    key={i}
                    x={x(edges[i]) + 0.5}
                    width={Math.max(0.5, x(edges[i + 1]) - x(edges[i]) - 1)}
                    y={y(c)}
                    height={s.y0 + stripH - y(c)}
                    fill={s.color}
                    opacity={0.55}
                  />
                ) : null,
              )}
              <text x={width - M.right - 4} y={s.y0 + 11} textAnchor="end" className="tick">
                {s.label} ({plural(total(s.key, s.counts), 'case')})
              </text>
              <text x={M.left - 6} y={s.y0 + 10} textAnchor="end" className="tick">
                {count(Math.max(...s.counts, 0))}
              </text>
              <text x={M.left - 6} y={s.y0 + stripH} textAnchor="end" className="tick">
                0
              </text>
            </g>
          );
        })}
        {xt.map((t) => (
          <g key={`x${t}`}>
            <line x1={x(t)} x2={x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {fmtX(t)}
            </text>
          </g>
        ))}
        <text x={(M.left + width - M.right) / 2} y={height - 6} textAnchor="middle" className="axis-label">
          Predicted risk
        </text>
        <text
          transform={`translate(14 ${(top + height - M.bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          className="axis-label"
        >
          Cases per bin
        </text>
        <MarkLines marks={p.marks} x={x} top={top} bottom={height - M.bottom} plot="hist" />
      </svg>
      <figcaption className="legend">
        <span>
          <svg width="12" height="10" aria-hidden="true">
            <rect width="12" height="10" fill={palette.vermillion} opacity={0.55} />
          </svg>{' '}
          with the event
        </span>
        <span>
          <svg width="12" height="10" aria-hidden="true">
            <rect width="12" height="10" fill={palette.blue} opacity={0.55} />
          </svg>{' '}
          without the event
        </span>
        <MarkLegend marks={p.marks} />
      </figcaption>
      {outside > 0 && (
        <p className="hint">
          Outside this range:{' '}
          {[
            below.events + below.nonEvents > 0
              ? `${plural(below.events + below.nonEvents, 'case')} below ${pct(p.domain[0])}`
              : '',
            above.events + above.nonEvents > 0
              ? `${plural(above.events + above.nonEvents, 'case')} at or above ${pct(p.domain[1])}`
              : '',
          ]
            .filter(Boolean)
            .join(', ')}
          .
        </p>
      )}
      <NumbersTable
        summary="Predicted risks as numbers"
        headers={['Predicted risk', 'With the event', 'Without the event']}
        rows={[
          ...(below.events + below.nonEvents > 0
            ? [[`below ${pct(edges[0], 1)}`, count(p.bins.below.events), count(p.bins.below.nonEvents)]]
            : []),
          ...events.map((e, i) => [`${pct(edges[i], 1)} to ${pct(edges[i + 1], 1)}`, count(e), count(nonEvents[i])]),
          ...(above.events + above.nonEvents > 0
            ? [
                [
                  `${pct(edges[edges.length - 1], 1)} or more`,
                  count(p.bins.above.events),
                  count(p.bins.above.nonEvents),
                ],
              ]
            : []),
        ]}
      />
      <PlotExport title={p.title} />
    </figure>
  );
}
