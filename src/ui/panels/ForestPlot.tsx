import { scaleLog } from 'd3';
import type { DesignRecipe } from '../../engine/core';
import { oddsDisplayRows } from '../../report/oddsUnits';
import type { OddsRow } from '../../worker/protocol';
import { useApp } from '../context';
import { num, palette } from '../format';
import { PlotExport } from '../plots/PlotExport';

/**
 * Odds ratios on a log axis with their intervals (profile likelihood when available, else Wald), per the unit
 * chosen for each numeric predictor, with each categorical predictor's reference level drawn at 1.
 */
export function ForestPlot({ rows, level, recipe }: { rows: OddsRow[]; level: number; recipe?: DesignRecipe }) {
  const units = useApp((s) => s.oddsUnits);
  const kept = rows.filter((r) => r.term !== '(Intercept)' && !r.aliased);
  // On the log-odds scale: a row scaled by its unit (limits likewise), a reference row at 0 (OR 1) without interval.
  const shown: Shown[] = recipe
    ? oddsDisplayRows(recipe, kept, units).map((d) =>
        d.kind === 'reference'
          ? { name: `${d.label} (reference)`, estimate: 0, lower: null, upper: null, reference: true }
          : {
              name: d.label,
              estimate: d.unit * d.row.estimate,
              lower: scaled(d.row.profileLower ?? d.row.waldLower, d.unit),
              upper: scaled(d.row.profileUpper ?? d.row.waldUpper, d.unit),
              reference: false,
            },
      )
    : kept.map((r) => ({
        name: r.name,
        estimate: r.estimate,
        lower: r.profileLower ?? r.waldLower,
        upper: r.profileUpper ?? r.waldUpper,
        reference: false,
      }));
  const lo = (r: Shown) => r.lower;
  const hi = (r: Shown) => r.upper;
  const vals = shown.flatMap((r) =>
    [r.estimate, lo(r), hi(r)].filter((v): v is number => v !== null && Number.isFinite(v)),
  );
  const min = Math.max(-8, Math.min(-0.1, ...vals)),
    max = Math.min(8, Math.max(0.1, ...vals));
  const W = 420,
    rowH = 22,
    left = 170,
    right = 28,
    top = 8,
    H = top + shown.length * rowH + 34;
  const x = scaleLog()
    .domain([Math.exp(min), Math.exp(max)])
    .range([left, W - right])
    .nice()
    .clamp(true);
  const [d0, d1] = x.domain();
  const series = [-4, -3, -2, -1, 0, 1, 2, 3, 4]
    .flatMap((e) => [1, 2, 5].map((m) => m * 10 ** e))
    .filter((t) => t >= d0 && t <= d1);
  const ticks = series.length <= 7 ? series : series.filter((t) => Math.abs(Math.log10(t) % 1) < 1e-9);
  return (
    <figure className="plot forest">
      <svg
        width={W}
        height={H}
        viewBox={`0 0 ${W} ${H}`}
        role="img"
        aria-label={`Odds ratios with ${Math.round(level * 100)}% intervals on a log scale`}
      >
        <line x1={x(1)} x2={x(1)} y1={top} y2={H - 30} stroke={palette.grey} strokeDasharray="3 3" />
        {shown.map((r, i) => {
          const y = top + i * rowH + rowH / 2;
          const l = lo(r),
            h = hi(r);
          return (
            <g key={r.name}>
              <text x={left - 6} y={y + 4} textAnchor="end" className="tick">
                {r.name.length > 26 ? `${r.name.slice(0, 25)}…` : r.name}
              </text>
              {l !== null && h !== null && (
                <line x1={x(Math.exp(l))} x2={x(Math.exp(h))} y1={y} y2={y} stroke={palette.blue} strokeWidth={2} />
              )}
              <rect
                x={x(Math.exp(r.estimate)) - 4}
                y={y - 4}
                width={8}
                height={8}
                fill={r.reference ? 'none' : palette.vermillion}
                stroke={r.reference ? palette.grey : 'none'}
              />
            </g>
          );
        })}
        <line x1={left} x2={W - right} y1={H - 30} y2={H - 30} stroke="#333" />
        {ticks.map((t) => (
          <text key={t} x={x(t)} y={H - 16} textAnchor="middle" className="tick">
            {t >= 10 ? t.toLocaleString('en-GB', { maximumFractionDigits: 0 }) : num(t, t < 1 ? 2 : 1)}
          </text>
        ))}
        <text x={(left + W) / 2} y={H - 2} textAnchor="middle" className="axis-label">
          Odds ratio (log scale)
        </text>
      </svg>
      <PlotExport title="Odds ratios (forest plot)" />
    </figure>
  );
}

interface Shown {
  name: string;
  /** Log-odds, per the chosen unit. */
  estimate: number;
  lower: number | null;
  upper: number | null;
  reference: boolean;
}

const scaled = (x: number | null, unit: number) => (x === null ? null : unit * x);
