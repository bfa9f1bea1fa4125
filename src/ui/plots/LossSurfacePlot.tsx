import { contours, extent, geoPath, interpolateViridis, scaleLinear, scaleSequential } from 'd3';
import type { LossSurfaceView } from '../../worker/protocol';
import { palette } from '../format';
import { PlotExport } from './PlotExport';

/** Mean cross-entropy over two coefficients: filled contours (viridis), the optimiser's path and the optimum. */
export function LossSurfacePlot({ view }: { view: LossSurfaceView }) {
  const W = 420,
    H = 340,
    m = { l: 56, r: 12, t: 10, b: 42 };
  const nx = view.xs.length,
    ny = view.ys.length;
  const [vmin, vmax] = extent(view.values) as [number, number];
  const levels = contours()
    .size([nx, ny])
    .thresholds(Array.from({ length: 14 }, (_, k) => vmin + ((vmax - vmin) * k ** 2) / 14 ** 2))(view.values);
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
  const color = scaleSequential(interpolateViridis).domain([vmax, vmin]);
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
        <text x={(m.l + W) / 2} y={H - 6} textAnchor="middle" className="axis-label">
          {view.names[0]} (coefficient)
        </text>
        <text transform={`translate(14 ${(H - m.b) / 2}) rotate(-90)`} textAnchor="middle" className="axis-label">
          {view.names[1]} (coefficient)
        </text>
        {view.path.length > 1 && <polyline points={pathPts} fill="none" stroke={palette.vermillion} strokeWidth={2} />}
        {view.path.map(([a, b], i) => (
          <circle key={i} cx={x(a)} cy={y(b)} r={3} fill={palette.vermillion} />
        ))}
        <circle cx={x(view.optimum[0])} cy={y(view.optimum[1])} r={5} fill="white" stroke="black" strokeWidth={2} />
      </svg>
      <figcaption className="legend">
        Darker = lower {view.penalised ? 'penalised ' : ''}mean cross-entropy.{' '}
        <span style={{ color: palette.vermillion }}>●—</span> optimiser’s steps; ○ the estimate.
      </figcaption>
      <PlotExport title="Loss surface" />
    </figure>
  );
}
