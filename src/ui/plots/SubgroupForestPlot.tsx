import { scaleLinear, scaleLog } from 'd3';
import { useId } from 'react';
import type { ForestData, ForestRow } from '../../engine/subgroups';
import { forestDomain, PRECISION_WORDS } from '../../report/subgroupTable';
import { count, num, palette } from '../format';
import { PlotExport } from './PlotExport';

const ROW = 30;
const LABEL_W = 215;
const PANEL_W = 200;
const GAP = 24;
const M = { top: 10, bottom: 42 };

/**
 * A forest plot of subgroup estimates: one row per group (label, n, events and what the too-small rule says) and
 * the overall row at the bottom, one panel per measure with its reference line (dashed) and the estimates with
 * their intervals; a group whose estimate was not computed keeps its row, marked "not computed". Drawn from the
 * engine's forestData, as the PDF draws the same panels.
 */
export function SubgroupForestPlot({ panels, title }: { panels: ForestData[]; title: string }) {
  const id = useId();
  const rows = [...panels[0].rows, panels[0].overall];
  const width = LABEL_W + panels.length * PANEL_W + (panels.length - 1) * GAP + 8;
  const height = M.top + rows.length * ROW + 8 + M.bottom;
  const yOf = (k: number) => M.top + (k + 0.5) * ROW + (k === rows.length - 1 ? 8 : 0);
  return (
    <figure className="plot" data-testid="subgroup-forest">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{title}</title>
        {rows.map((r, k) => (
          <RowLabel key={`l${k}`} r={r} y={yOf(k)} overall={k === rows.length - 1} />
        ))}
        <line
          x1={0}
          x2={width}
          y1={yOf(rows.length - 1) - ROW / 2 - 4}
          y2={yOf(rows.length - 1) - ROW / 2 - 4}
          stroke="#ccc"
        />
        {panels.map((p, j) => (
          <Panel key={p.measure} p={p} left={LABEL_W + j * (PANEL_W + GAP)} height={height} yOf={yOf} />
        ))}
      </svg>
      <figcaption className="legend">
        Dots: each group’s estimate; lines: its {Math.round(panels[0].level * 100)}% interval; square: all rows; dashed
        line: no difference (O/E 1, AUC 0.5, slope 1).
      </figcaption>
      <PlotExport title={title} />
    </figure>
  );
}

function RowLabel({ r, y, overall }: { r: ForestRow; y: number; overall: boolean }) {
  const note = PRECISION_WORDS[r.precision];
  return (
    <g data-testid="forest-row">
      <text x={4} y={y - 2} className="tick" fontWeight={overall ? 700 : 400} textAnchor="start">
        {overall ? 'All rows' : r.label.length > 24 ? `${r.label.slice(0, 23)}…` : r.label}
      </text>
      <text x={4} y={y + 10} className="tick" fontSize={10} fill={note ? palette.vermillion : '#555'}>
        {`n ${count(r.n)}, events ${count(r.events)}${note ? ` · ${note.split(':')[0]}` : ''}`}
      </text>
    </g>
  );
}

function Panel({ p, left, height, yOf }: { p: ForestData; left: number; height: number; yOf: (k: number) => number }) {
  const [lo, hi] = forestDomain(p);
  const range: [number, number] = [left, left + PANEL_W];
  const x = p.scale === 'log' ? scaleLog().domain([lo, hi]).range(range) : scaleLinear().domain([lo, hi]).range(range);
  const ticks = p.scale === 'log' ? logTicks(lo, hi) : x.ticks(4);
  const bottom = height - M.bottom;
  const rows = [...p.rows, p.overall];
  const clamp = (v: number) => Math.min(hi, Math.max(lo, v));
  return (
    <g data-measure={p.measure}>
      {ticks.map((t) => (
        <g key={t}>
          <line x1={x(t)} x2={x(t)} y1={M.top} y2={bottom} className="grid" />
          <text x={x(t)} y={bottom + 14} textAnchor="middle" className="tick">
            {String(Number(t.toPrecision(3)))}
          </text>
        </g>
      ))}
      <line x1={left} x2={left + PANEL_W} y1={bottom} y2={bottom} stroke="#333" />
      {p.reference >= lo && p.reference <= hi && (
        <line x1={x(p.reference)} x2={x(p.reference)} y1={M.top} y2={bottom} stroke="#777" strokeDasharray="4 3" />
      )}
      <text x={left + PANEL_W / 2} y={height - 8} textAnchor="middle" className="axis-label">
        {p.title}
      </text>
      {rows.map((r, k) => {
        const y = yOf(k);
        const overall = k === rows.length - 1;
        const colour = overall ? '#111' : palette.blue;
        const label = `${overall ? 'All rows' : r.label}: ${p.title} ${num(r.estimate, 3)}`;
        if (r.estimate === null || !Number.isFinite(r.estimate))
          return (
            <text key={k} x={left + PANEL_W - 4} y={y + 4} className="tick" fill="#777" textAnchor="end">
              not computed
            </text>
          );
        const bar = r.lower !== null && r.upper !== null && Number.isFinite(r.lower) && Number.isFinite(r.upper);
        return (
          <g key={k} data-testid="forest-estimate">
            <title>{label + (bar ? ` (${num(r.lower, 3)} to ${num(r.upper, 3)})` : '')}</title>
            {bar && (
              <line x1={x(clamp(r.lower!))} x2={x(clamp(r.upper!))} y1={y} y2={y} stroke={colour} strokeWidth={2} />
            )}
            {p.scale === 'log' && r.estimate <= 0 && (
              <text x={left + 2} y={y - 5} className="tick" fontSize={10} fill={colour}>
                O/E {num(r.estimate, 2)}, left of the log scale
              </text>
            )}
            {r.estimate >= lo &&
              r.estimate <= hi &&
              (overall ? (
                <rect x={x(r.estimate) - 5} y={y - 5} width={10} height={10} fill={colour} />
              ) : (
                <circle cx={x(r.estimate)} cy={y} r={4.5} fill={colour} />
              ))}
          </g>
        );
      })}
    </g>
  );
}

function logTicks(lo: number, hi: number): number[] {
  const cands = [0.05, 0.1, 0.2, 0.25, 0.5, 0.75, 1, 1.5, 2, 3, 4, 5, 10, 20];
  const inside = cands.filter((t) => t >= lo && t <= hi);
  return inside.length > 6 ? inside.filter((t) => [0.05, 0.1, 0.25, 0.5, 1, 2, 4, 10, 20].includes(t)) : inside;
}
