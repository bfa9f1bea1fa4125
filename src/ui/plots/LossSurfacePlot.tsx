import { useId } from 'react';
import { contours, extent, geoPath, interpolateViridis, scaleLinear, scaleSequential } from 'd3';
import type { LossSurfaceView } from '../../worker/protocol';
import { num, palette } from '../format';
import { PlotExport } from './PlotExport';

/** The axis title of one coefficient on the surface's scale. */
export function surfaceAxisTitle(view: LossSurfaceView, k: 0 | 1): string {
  const name = view.names[k];
  if (view.scale === 'original') return `${name} (coefficient per unit)`;
  return name === '(Intercept)' ? `${name} at the means (log-odds)` : `${name} (coefficient per SD)`;
}

/**
 * Mean cross-entropy over two coefficients: filled contours (viridis, darker = lower), a colour bar with the values
 * of the shown surface, the optimiser's path (clipped to the window) and the estimate.
 */
export function LossSurfacePlot({ view }: { view: LossSurfaceView }) {
  const clip = useId();
  const W = 500,
    H = 340,
    m = { l: 56, r: 104, t: 10, b: 42 };
  const nx = view.xs.length,
    ny = view.ys.length;
  const [vmin, vmax] = extent(view.values) as [number, number];
  const thresholds = Array.from({ length: 14 }, (_, k) => vmin + ((vmax - vmin) * k ** 2) / 14 ** 2);
  const levels = contours().size([nx, ny]).thresholds(thresholds)(view.values);
  const x = scaleLinear()
    .domain([view.xs[0], view.xs[nx - 1]])
    .range([m.l, W - m.r]);
  const y = scaleLinear()
    .domain([view.ys[0], view.ys[ny - 1]])
    .range([H - m.b, m.t]);
  const gx = scaleLinear()
    .domain([0, nx - 1])
    .range([m.l, W - m.r]);
  const gy = scaleLinear()
    .domain([0, ny - 1])
    .range([H - m.b, m.t]);
  const toScreen = geoPath();
  const color = scaleSequential(interpolateViridis).domain([vmin, vmax]);
  // The colour bar: one block per contour band, filled as the band is (its lower threshold's colour).
  const bar = { x: W - m.r + 14, w: 14 };
  const by = scaleLinear()
    .domain([vmin, vmax === vmin ? vmin + 1 : vmax])
    .range([H - m.b, m.t]);
  const bands = thresholds.map((t, k) => [t, k + 1 < thresholds.length ? thresholds[k + 1] : vmax] as const);
  const digits = Math.max(3, Math.min(6, 2 - Math.floor(Math.log10(Math.max(vmax - vmin, 1e-9)))));
  const barTicks = [0, 0.25, 0.5, 0.75, 1].map((f) => vmin + f * (vmax - vmin));
  const inside = ([a, b]: [number, number]) =>
    a >= view.xs[0] && a <= view.xs[nx - 1] && b >= view.ys[0] && b <= view.ys[ny - 1];
  const outside = view.path.filter((pt) => !inside(pt)).length;
  const pathPts = view.path.map(([a, b]) => `${x(a)},${y(b)}`).join(' ');
  return (
    <figure className="plot">
      <svg
        width={W}
        height={H}
        viewBox={`0 0 ${W} ${H}`}
        role="img"
        aria-label={`Mean cross-entropy over ${view.names[0]} and ${view.names[1]}, with the optimiser's path`}
      >
        <defs>
          <clipPath id={clip}>
            <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} />
          </clipPath>
        </defs>
        <g transform={`translate(${gx(0)} ${gy(0)}) scale(${gx(1) - gx(0)} ${gy(1) - gy(0)}) translate(-0.5 -0.5)`}>
          {levels.map((c) => (
            <path key={c.value} d={toScreen(c) ?? ''} fill={color(c.value)} stroke="none" />
          ))}
        </g>
        {x.ticks(5).map((t) => (
          <text key={`x${t}`} x={x(t)} y={H - m.b + 16} textAnchor="middle" className="tick">
            {x.tickFormat(5)(t)}
          </text>
        ))}
        {y.ticks(5).map((t) => (
          <text key={`y${t}`} x={m.l - 6} y={y(t) + 4} textAnchor="end" className="tick">
            {y.tickFormat(5)(t)}
          </text>
        ))}
        <text x={(m.l + W - m.r) / 2} y={H - 6} textAnchor="middle" className="axis-label">
          {surfaceAxisTitle(view, 0)}
        </text>
        <text transform={`translate(14 ${(H - m.b) / 2}) rotate(-90)`} textAnchor="middle" className="axis-label">
          {surfaceAxisTitle(view, 1)}
        </text>
        <g clipPath={`url(#${clip})`}>
          {view.path.length > 1 && (
            <polyline points={pathPts} fill="none" stroke={palette.vermillion} strokeWidth={2} />
          )}
          {view.path.map(([a, b], i) => (
            <circle key={i} cx={x(a)} cy={y(b)} r={3} fill={palette.vermillion} />
          ))}
        </g>
        <circle cx={x(view.optimum[0])} cy={y(view.optimum[1])} r={5} fill="white" stroke="black" strokeWidth={2} />
        <g data-testid="loss-colour-bar" aria-hidden="true">
          {bands.map(([lo, hi]) => (
            <rect key={lo} x={bar.x} y={by(hi)} width={bar.w} height={Math.max(0, by(lo) - by(hi))} fill={color(lo)} />
          ))}
          <rect x={bar.x} y={m.t} width={bar.w} height={H - m.b - m.t} fill="none" stroke="#555" />
          {barTicks.map((t) => (
            <text key={t} x={bar.x + bar.w + 4} y={by(t) + 4} className="tick">
              {num(t, digits)}
            </text>
          ))}
          <text transform={`translate(${W - 6} ${(H - m.b) / 2}) rotate(-90)`} textAnchor="middle" className="tick">
            {view.penalised ? 'penalised ' : ''}mean cross-entropy
          </text>
        </g>
      </svg>
      <figcaption className="legend">
        <span>
          Darker = lower {view.penalised ? 'penalised ' : ''}mean cross-entropy (bar: {num(vmin, digits)} to{' '}
          {num(vmax, digits)}).
        </span>
        <span>
          <span style={{ color: palette.vermillion }}>●—</span> optimiser’s steps
          {outside > 0 ? ` (${outside} of ${view.path.length} outside this window)` : ''}
        </span>
        <span>○ the estimate</span>
      </figcaption>
      <PlotExport title="Loss surface" />
    </figure>
  );
}
