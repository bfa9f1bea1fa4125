import { qnorm } from '../numerics/distributions';
import { quantileSorted } from '../numerics/quantile';
import { funnelRatioLimits, observedExpectedRatio } from './poisson';
import type {
  FunnelCurves,
  FunnelFlag,
  FunnelLimits,
  FunnelOverdispersion,
  FunnelUnit,
  MonitoringFunnel,
} from './types';

/** Observed and expected counts of one unit. */
export interface UnitCounts {
  unit: string;
  n: number;
  observed: number;
  expected: number;
}

const WINSOR: [number, number] = [0.1, 0.9];

function exactLimits(levels: [number, number], e: number): FunnelLimits {
  return { inner: funnelRatioLimits(levels[0], e), outer: funnelRatioLimits(levels[1], e) };
}

function flagOf(oe: number, l: FunnelLimits): FunnelFlag {
  if (oe > l.outer.upper) return 'above-outer';
  if (oe > l.inner.upper) return 'above-inner';
  if (oe < l.outer.lower) return 'below-outer';
  if (oe < l.inner.lower) return 'below-inner';
  return 'within';
}

/** Normal-approximation limits 1 ± z·√(φ/E) inflated by φ (Spiegelhalter 2005, §4), lower kept ≥ 0. */
function adjusted(levels: [number, number], e: number, phi: number): FunnelLimits {
  const band = (level: number) => {
    const half = qnorm(1 - (1 - level) / 2) * Math.sqrt(phi / e);
    return { lower: Math.max(0, 1 - half), upper: 1 + half };
  };
  return { inner: band(levels[0]), outer: band(levels[1]) };
}

function curves(grid: number[], limits: (e: number) => FunnelLimits): FunnelCurves {
  const rows = grid.map(limits);
  return {
    expected: grid,
    innerLower: rows.map((r) => r.inner.lower),
    innerUpper: rows.map((r) => r.inner.upper),
    outerLower: rows.map((r) => r.outer.lower),
    outerUpper: rows.map((r) => r.outer.upper),
  };
}

/** 120 expected counts, evenly spaced on the log scale, covering the units' E (and at least 0.5 to 1.2·max). */
export function funnelGrid(expected: number[]): number[] {
  const pos = expected.filter((e) => e > 0);
  const lo = Math.min(0.5, ...pos),
    hi = Math.max(2, ...pos) * 1.2;
  const k = 120;
  return Array.from({ length: k }, (_, i) => lo * Math.pow(hi / lo, i / (k - 1)));
}

/**
 * Spiegelhalter's multiplicative overdispersion factor (2005, Stat Med 24:1185, §4): z-scores (O − E)/√E,
 * winsorised at their 10th and 90th percentiles (R type 7), φ = Σ z²/k over the k units with E > 0.
 */
export function overdispersionFactor(units: UnitCounts[]): { phi: number; units: number } {
  const z = units.filter((u) => u.expected > 0).map((u) => (u.observed - u.expected) / Math.sqrt(u.expected));
  if (z.length === 0) return { phi: 1, units: 0 };
  const sorted = Float64Array.from(z).sort();
  const lo = quantileSorted(sorted, WINSOR[0]),
    hi = quantileSorted(sorted, WINSOR[1]);
  let s = 0;
  for (const v of z) {
    const w = Math.min(hi, Math.max(lo, v));
    s += w * w;
  }
  return { phi: s / z.length, units: z.length };
}

/**
 * The funnel plot of units' O/E against E (Spiegelhalter 2005): exact Poisson limits with the paper's
 * interpolation at the two levels, each unit flagged against them; with `overdispersion`, φ and the inflated
 * limits too (applied only when φ > 1).
 */
export function funnelPlot(
  units: UnitCounts[],
  levels: [number, number],
  level: number,
  overdispersion: boolean,
): MonitoringFunnel {
  const od = overdispersion ? overdispersionFactor(units) : null;
  const applied = od !== null && od.phi > 1;
  const rows: FunnelUnit[] = [...units]
    .sort((a, b) => (a.unit < b.unit ? -1 : a.unit > b.unit ? 1 : 0))
    .map((u) => {
      const oe = observedExpectedRatio(u.observed, u.expected, level);
      const ok = u.expected > 0;
      const limits = ok
        ? exactLimits(levels, u.expected)
        : { inner: { lower: 0, upper: 0 }, outer: { lower: 0, upper: 0 } };
      const adj = od && ok ? (applied ? adjusted(levels, u.expected, od.phi) : limits) : null;
      return {
        unit: u.unit,
        n: u.n,
        observed: u.observed,
        expected: u.expected,
        oe,
        oMinusE: u.observed - u.expected,
        limits,
        flag: ok && oe.estimate !== null ? flagOf(oe.estimate, limits) : 'within',
        adjustedLimits: adj,
        adjustedFlag: adj && oe.estimate !== null ? flagOf(oe.estimate, adj) : null,
      };
    });
  const grid = funnelGrid(units.map((u) => u.expected));
  let odRecord: FunnelOverdispersion | null = null;
  if (od) {
    odRecord = {
      phi: od.phi,
      units: od.units,
      winsorised: WINSOR,
      applied,
      curves: curves(grid, (e) => (applied ? adjusted(levels, e, od.phi) : exactLimits(levels, e))),
    };
  }
  return { levels, units: rows, curves: curves(grid, (e) => exactLimits(levels, e)), overdispersion: odRecord };
}
