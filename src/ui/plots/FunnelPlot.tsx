import { scaleLinear, scaleLog } from 'd3';
import { useId } from 'react';
import type { FunnelCurves, FunnelFlag } from '../../engine/monitoring';
import { finiteMax, palette } from '../format';
import { PlotExport } from './PlotExport';
import { YGrid } from './YGrid';

export interface FunnelPlotProps {
  title: string;
  /** The limit curves over expected counts (O/E scale, target 1). */
  curves: FunnelCurves;
  levels: [number, number];
  /** One point per unit: its expected count, its O/E and where it sits against the limits drawn. */
  units: { unit: string; expected: number; oe: number | null; flag: FunnelFlag }[];
  width?: number;
  height?: number;
}

const M = { top: 12, right: 16, bottom: 40, left: 52 };
const OUTER: FunnelFlag[] = ['above-outer', 'below-outer'];
const INNER: FunnelFlag[] = ['above-inner', 'below-inner'];

/** Each unit's O/E against its expected count (log scale) inside the funnel of exact-Poisson limits. */
export function FunnelPlot(p: FunnelPlotProps) {
  const width = p.width ?? 560;
  const height = p.height ?? 320;
  const id = useId();
  const es = [...p.curves.expected, ...p.units.map((u) => u.expected)].filter((e) => e > 0 && Number.isFinite(e));
  const eMin = Math.max(0.1, Math.min(...es));
  const eMax = Math.max(eMin * 10, finiteMax(es, 10));
  const yMax = Math.min(
    6,
    Math.max(
      2,
      finiteMax(
        p.units.map((u) => (u.oe ?? NaN) * 1.1),
        2,
      ),
    ),
  );
  const x = scaleLog()
    .domain([eMin, eMax])
    .range([M.left, width - M.right])
    .clamp(true);
  const y = scaleLinear()
    .domain([0, yMax])
    .range([height - M.bottom, M.top])
    .clamp(true);
  const curve = (ys: number[]): string => {
    let d = '';
    let open = false;
    p.curves.expected.forEach((e, i) => {
      if (!Number.isFinite(ys[i]) || !(e > 0)) {
        open = false;
        return;
      }
      d += `${open ? 'L' : 'M'}${x(e).toFixed(1)},${y(ys[i]).toFixed(1)}`;
      open = true;
    });
    return d;
  };
  const xt = x.ticks(5).filter((t) => [1, 2, 5].includes(Number(t.toExponential(0).split('e')[0])));
  const yt = y.ticks(5);
  const pct = (l: number) => `${+(100 * l).toPrecision(4)}%`;
  return (
    <figure className="plot">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-labelledby={`${id}-t`}>
        <title id={`${id}-t`}>{p.title}</title>
        <YGrid ticks={yt} y={y} left={M.left} right={width - M.right} label={y.tickFormat(5)} />
        {xt.map((t) => (
          <g key={`x${t}`}>
            <line x1={x(t)} x2={x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke="#333" />
            <text x={x(t)} y={height - M.bottom + 16} textAnchor="middle" className="tick">
              {t >= 1 ? t.toLocaleString('en-GB') : t}
            </text>
          </g>
        ))}
        <line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke="#333" />
        <line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke="#333" />
        <text x={(M.left + width - M.right) / 2} y={height - 6} textAnchor="middle" className="axis-label">
          Expected events (log scale)
        </text>
        <text transform={`translate(14 ${(M.top + height - M.bottom) / 2}) rotate(-90)`} className="axis-label">
          O/E
        </text>
        <line x1={M.left} x2={width - M.right} y1={y(1)} y2={y(1)} stroke={palette.grey} />
        {[p.curves.innerLower, p.curves.innerUpper].map((c, i) => (
          <path key={`in${i}`} d={curve(c)} fill="none" stroke={palette.blue} strokeDasharray="5 3" strokeWidth={1.5} />
        ))}
        {[p.curves.outerLower, p.curves.outerUpper].map((c, i) => (
          <path key={`out${i}`} d={curve(c)} fill="none" stroke={palette.vermillion} strokeWidth={1.8} />
        ))}
        {p.units.map((u) => {
          if (u.oe === null || !(u.expected > 0)) return null;
          const out = OUTER.includes(u.flag);
          const inner = INNER.includes(u.flag);
          const cx = x(u.expected);
          const cy = y(Math.min(u.oe, yMax));
          return (
            <g key={u.unit} data-testid="funnel-unit" data-flag={u.flag}>
              <circle
                cx={cx}
                cy={cy}
                r={out ? 5.5 : 4}
                fill={out ? palette.vermillion : inner ? palette.orange : palette.blue}
                stroke="#fff"
              >
                <title>{`${u.unit}: O/E ${u.oe.toFixed(2)}, expected ${u.expected.toFixed(1)}`}</title>
              </circle>
              {(out || inner) && (
                <text x={cx + 7} y={cy - 6} className="tick" fill={out ? palette.vermillion : '#6b4a00'}>
                  {u.unit}
                </text>
              )}
            </g>
          );
        })}
      </svg>
      <figcaption className="legend">
        <span>
          <svg width="18" height="8" aria-hidden="true">
            <line x1="0" x2="18" y1="4" y2="4" stroke={palette.blue} strokeWidth="2" strokeDasharray="5 3" />
          </svg>{' '}
          {pct(p.levels[0])} limits
        </span>
        <span>
          <svg width="18" height="8" aria-hidden="true">
            <line x1="0" x2="18" y1="4" y2="4" stroke={palette.vermillion} strokeWidth="2" />
          </svg>{' '}
          {pct(p.levels[1])} limits
        </span>
        <span>
          <svg width="10" height="10" aria-hidden="true">
            <circle cx="5" cy="5" r="4" fill={palette.blue} />
          </svg>{' '}
          unit (named when outside a limit)
        </span>
      </figcaption>
      <PlotExport title={p.title} />
    </figure>
  );
}
