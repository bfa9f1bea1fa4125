import { FulcraError } from '../core/data';
import { pchisqUpper } from '../numerics/distributions';
import { quantileSorted } from '../numerics/quantile';
import { warning, type EngineWarning } from '../core/warnings';
import { checkScoredOutcome } from './threshold';

export interface HosmerLemeshowGroup {
  /** Risk interval (lower, upper]; the first group includes its lower limit. */
  lower: number;
  upper: number;
  n: number;
  observedEvents: number;
  expectedEvents: number;
  observedNonEvents: number;
  expectedNonEvents: number;
  meanRisk: number;
}

export interface HosmerLemeshowResult {
  statistic: number | null;
  df: number | null;
  p: number | null;
  groups: HosmerLemeshowGroup[];
  groupingRule: string;
  /** Always true: report the calibration curve, slope and intercept first. */
  secondary: true;
  caveat: string;
  warnings: EngineWarning[];
}

const CAVEAT =
  'The Hosmer–Lemeshow test is secondary: its result depends on how cases are binned, it has little power in ' +
  'small samples, and in large samples it rejects almost any model. Read the calibration curve, slope and ' +
  'intercept first.';

/**
 * Hosmer–Lemeshow goodness-of-fit (Hosmer & Lemeshow 1980, Commun Stat A9:1043) with "deciles of risk":
 * breaks = distinct type-7 quantiles of p at 0, 0.1, …, 1; groups (b_{j−1}, b_j], the first closed below
 * (R: cut(p, unique(quantile(p, 0:g/g)), include.lowest = TRUE)); empty groups are dropped.
 * C = Σ_groups Σ_{events, non-events} (O − E)²/E on G − 2 df. Unweighted.
 */
export function hosmerLemeshow(
  y: Float64Array,
  p: Float64Array,
  g = 10,
  sortedRisks?: Float64Array,
): HosmerLemeshowResult {
  if (!(Number.isInteger(g) && g >= 3))
    throw new FulcraError('bad-groups', `The number of groups must be an integer ≥ 3, got ${g}.`);
  checkScoredOutcome(y, p, undefined, true);
  const groupingRule =
    `Cases sorted by predicted risk and cut at the ${g}-quantiles of the risks (R type 7; ` +
    `tied cut points merged; each group runs from above the previous cut up to and including its own). Empty ` +
    `groups are dropped; df = number of groups − 2.`;
  const warnings: EngineWarning[] = [];
  const sorted = sortedRisks && sortedRisks.length === p.length ? sortedRisks : p.slice().sort();
  const breaks = Array.from(new Set(Array.from({ length: g + 1 }, (_, j) => quantileSorted(sorted, j / g))));
  const G = Math.max(1, breaks.length - 1);
  const n = new Float64Array(G);
  const o = new Float64Array(G);
  const e = new Float64Array(G);
  for (let i = 0; i < y.length; i++) {
    let lo = 1;
    let hi = breaks.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (p[i] <= breaks[mid]) hi = mid;
      else lo = mid + 1;
    }
    const k = Math.max(0, Math.min(G - 1, lo - 1));
    n[k]++;
    o[k] += y[i];
    e[k] += p[i];
  }
  const groups: HosmerLemeshowGroup[] = [];
  let stat = 0;
  let zeroExpected = false;
  for (let k = 0; k < G; k++) {
    if (n[k] === 0) continue;
    const e0 = n[k] - e[k];
    groups.push({
      lower: breaks[k],
      upper: breaks[Math.min(k + 1, breaks.length - 1)],
      n: n[k],
      observedEvents: o[k],
      expectedEvents: e[k],
      observedNonEvents: n[k] - o[k],
      expectedNonEvents: e0,
      meanRisk: e[k] / n[k],
    });
    if (e[k] > 0) stat += (o[k] - e[k]) ** 2 / e[k];
    else if (o[k] > 0) zeroExpected = true;
    if (e0 > 0) stat += (n[k] - o[k] - e0) ** 2 / e0;
    else if (n[k] - o[k] > 0) zeroExpected = true;
  }
  if (!Number.isFinite(stat)) zeroExpected = true;
  if (groups.length < 3 || zeroExpected) {
    warnings.push(
      groups.length < 3
        ? warning(
            'hl-too-few-groups',
            `Only ${groups.length} group(s) of distinct risk could be formed, so the Hosmer–Lemeshow test ` +
              `cannot be computed.`,
            'Use the calibration curve instead.',
          )
        : warning(
            'hl-zero-expected',
            'A group has an expected count of 0 but observed cases, so the Hosmer–Lemeshow statistic is infinite.',
            'Check risks of exactly 0 or 1.',
          ),
    );
    return { statistic: null, df: null, p: null, groups, groupingRule, secondary: true, caveat: CAVEAT, warnings };
  }
  if (groups.length < g)
    warnings.push(
      warning(
        'hl-groups-merged',
        `Ties in the predicted risks left ${groups.length} groups instead of ${g}.`,
        'The test has fewer degrees of freedom; read it with care.',
      ),
    );
  const df = groups.length - 2;
  return {
    statistic: stat,
    df,
    p: pchisqUpper(stat, df),
    groups,
    groupingRule,
    secondary: true,
    caveat: CAVEAT,
    warnings,
  };
}
