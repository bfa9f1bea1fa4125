import { scaleLog } from 'd3';
import type { OddsRow } from '../../worker/protocol';
import { num, palette } from '../format';
import { PlotExport } from '../plots/PlotExport';

/** Odds ratios on a log axis with their intervals (profile likelihood when available, else Wald). */
export function ForestPlot({ rows, level }: { rows: OddsRow[]; level: number }) {
  const shown = rows.filter((r) => r.term !== '(Intercept)' && !r.aliased);
  const lo = (r: OddsRow) => r.profileLower ?? r.waldLower;
  const hi = (r: OddsRow) => r.profileUpper ?? r.waldUpper;
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
              <rect x={x(r.oddsRatio) - 4} y={y - 4} width={8} height={8} fill={palette.vermillion} />
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
