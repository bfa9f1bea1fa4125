import type { Costs } from '../core/costs';
import { valueNumber } from '../core/vectors';
import { searchSorted } from '../numerics/searchSorted';
import { FulcraError } from '../core/data';
import { qnorm } from '../numerics/distributions';
import { proportionCi, type ProportionCiMethod, type ProportionEstimate } from './proportionCi';

/**
 * Threshold analysis after ONE sort. Flag rule everywhere in Fulcra: a case is flagged when
 * risk ≥ threshold. `risks` holds the distinct risks in ascending order; `eventsAtOrAbove[k]` and
 * `nonEventsAtOrAbove[k]` are the (weighted) counts of events / non-events with risk ≥ risks[k].
 * Plain typed arrays, so the record is structured-clone safe and can be transferred.
 */
export interface PreparedThresholds {
  risks: Float64Array;
  eventsAtOrAbove: Float64Array;
  nonEventsAtOrAbove: Float64Array;
  events: number;
  nonEvents: number;
  total: number;
  weighted: boolean;
  /**
   * Weighted with whole-number weights (frequency weights: a row of weight w stands for w identical cases), so the
   * counts are case counts and every case-based statistic (DeLong's variance included) is that of the cases.
   */
  frequencyWeights?: boolean;
}

export const FLAG_RULE = 'A case is flagged when its risk is greater than or equal to the threshold.';

/**
 * Validates a 0/1 outcome against scores of the same length (finite; within [0, 1] when `isRisk`)
 * and optional non-negative finite weights. Throws FulcraError naming the first bad row.
 */
export function checkScoredOutcome(y: Float64Array, s: Float64Array, weights?: Float64Array, isRisk = true): void {
  if (y.length !== s.length)
    throw new FulcraError('length-mismatch', `The outcome has ${y.length} rows but the scores have ${s.length}.`);
  if (weights && weights.length !== y.length)
    throw new FulcraError(
      'length-mismatch',
      `The outcome has ${y.length} rows but the weights have ${weights.length}.`,
    );
  for (let i = 0; i < y.length; i++) {
    if (y[i] !== 0 && y[i] !== 1)
      throw new FulcraError(
        'bad-outcome',
        `The outcome must be 0 or 1; ${valueNumber(i)} is ${y[i]}.`,
        'Remove rows with a missing outcome first.',
      );
    const v = s[i];
    if (!Number.isFinite(v) || (isRisk && (v < 0 || v > 1))) {
      throw new FulcraError(
        'bad-score',
        `${isRisk ? 'Predicted risks must lie in [0, 1]' : 'Scores must be finite numbers'}; ` +
          `${valueNumber(i)} is ${v}.`,
        'Remove rows with a missing prediction first.',
      );
    }
    if (weights && !(weights[i] >= 0 && Number.isFinite(weights[i])))
      throw new FulcraError('bad-weight', `Weights must be finite and ≥ 0; ${valueNumber(i)} is ${weights[i]}.`);
  }
  if (weights && y.length > 0 && weights.every((w) => w === 0)) {
    throw new FulcraError(
      'bad-weight',
      'Every case weight is 0, so there is nothing to evaluate.',
      'Give at least one case a positive weight.',
    );
  }
}

/** Sorts once and accumulates counts (see PreparedThresholds). O(n log n); works for any score, not only risks. */
export function prepareThresholds(
  y: Float64Array,
  p: Float64Array,
  weights?: Float64Array,
  isRisk = true,
): PreparedThresholds {
  checkScoredOutcome(y, p, weights, isRisk);
  const n = y.length;
  let values: Float64Array;
  let ev: Float64Array;
  let ne: Float64Array;
  let k = 0;
  if (!weights) {
    let m = 0;
    for (let i = 0; i < n; i++) m += y[i];
    const pe = new Float64Array(m);
    const pn = new Float64Array(n - m);
    for (let i = 0, a = 0, b = 0; i < n; i++)
      if (y[i] === 1) pe[a++] = p[i];
      else pn[b++] = p[i];
    pe.sort();
    pn.sort();
    values = new Float64Array(n);
    ev = new Float64Array(n);
    ne = new Float64Array(n);
    let a = 0;
    let b = 0;
    while (a < pe.length || b < pn.length) {
      const v = b >= pn.length || (a < pe.length && pe[a] <= pn[b]) ? pe[a] : pn[b];
      values[k] = v;
      while (a < pe.length && pe[a] === v) {
        ev[k]++;
        a++;
      }
      while (b < pn.length && pn[b] === v) {
        ne[k]++;
        b++;
      }
      k++;
    }
  } else {
    const idx = new Uint32Array(n);
    for (let i = 0; i < n; i++) idx[i] = i;
    idx.sort((i, j) => p[i] - p[j]);
    values = new Float64Array(n);
    ev = new Float64Array(n);
    ne = new Float64Array(n);
    for (let r = 0; r < n;) {
      const v = p[idx[r]];
      values[k] = v;
      for (; r < n && p[idx[r]] === v; r++) {
        const i = idx[r];
        if (y[i] === 1) ev[k] += weights[i];
        else ne[k] += weights[i];
      }
      k++;
    }
  }
  const risks = values.slice(0, k);
  const eventsAtOrAbove = new Float64Array(k);
  const nonEventsAtOrAbove = new Float64Array(k);
  let se = 0;
  let sn = 0;
  for (let j = k - 1; j >= 0; j--) {
    se += ev[j];
    sn += ne[j];
    eventsAtOrAbove[j] = se;
    nonEventsAtOrAbove[j] = sn;
  }
  const out: PreparedThresholds = {
    risks,
    eventsAtOrAbove,
    nonEventsAtOrAbove,
    events: se,
    nonEvents: sn,
    total: se + sn,
    weighted: !!weights,
  };
  if (weights) out.frequencyWeights = weights.every((w) => Number.isInteger(w));
  return out;
}

/** Options of the curves drawn from one threshold structure (ROC, precision–recall). */
export interface CurveOptions {
  weights?: Float64Array;
  /** Most points kept in the returned curve (the AUC is computed from all of them). */
  maxPoints?: number;
}

/** Index of the first distinct risk ≥ t (risks.length when none): binary search, O(log n). */
export function firstAtOrAbove(risks: Float64Array, t: number): number {
  return searchSorted(risks, t, 'left');
}

/** Counts flagged at threshold t (flag rule risk ≥ t). */
export function confusionAt(prep: PreparedThresholds, t: number): { tp: number; fp: number; fn: number; tn: number } {
  const k = firstAtOrAbove(prep.risks, t);
  const tp = k < prep.risks.length ? prep.eventsAtOrAbove[k] : 0;
  const fp = k < prep.risks.length ? prep.nonEventsAtOrAbove[k] : 0;
  return { tp, fp, fn: prep.events - tp, tn: prep.nonEvents - fp };
}

/** Costs per case: of a missed event, of a false alarm, and optionally the benefit of a caught event. */
export interface DecisionCosts extends Costs {
  truePositiveBenefit?: number;
}

function checkCosts(c: DecisionCosts): void {
  const b = c.truePositiveBenefit ?? 0;
  for (const [name, v] of [
    ['missedCase', c.missedCase],
    ['falseAlarm', c.falseAlarm],
    ['truePositiveBenefit', b],
  ] as const) {
    if (!(v >= 0 && Number.isFinite(v)))
      throw new FulcraError('bad-cost', `The cost ${name} must be a finite number ≥ 0, got ${v}.`);
  }
  if (c.falseAlarm === 0 && c.missedCase + b === 0)
    throw new FulcraError('bad-cost', 'At least one cost must be greater than 0.');
}

/** Expected cost per 100 cases: 100·(C_FN·FN + C_FP·FP − B·TP)/n. */
export function costPer100(conf: { tp: number; fp: number; fn: number }, total: number, c: DecisionCosts): number {
  return (100 * (c.missedCase * conf.fn + c.falseAlarm * conf.fp - (c.truePositiveBenefit ?? 0) * conf.tp)) / total;
}

export interface ThresholdMetrics {
  threshold: number;
  flagRule: string;
  tp: number;
  fp: number;
  fn: number;
  tn: number;
  sensitivity: ProportionEstimate;
  specificity: ProportionEstimate;
  ppv: ProportionEstimate;
  npv: ProportionEstimate;
  fractionFlagged: ProportionEstimate;
  /** sensitivity / (1 − specificity); null when undefined (division by zero). */
  lrPositive: number | null;
  /** (1 − sensitivity) / specificity; null when undefined. */
  lrNegative: number | null;
  /**
   * Confidence intervals of LR+ and LR− by the log method (Simel, Samsa & Matchar 1991, J Clin Epidemiol 44:763);
   * null when a count in the formula is 0 or the counts are weighted.
   */
  lrPositiveCi: { lower: number; upper: number } | null;
  lrNegativeCi: { lower: number; upper: number } | null;
  /** null when no costs were given. */
  expectedCostPer100: number | null;
}

export interface AtThresholdOptions {
  costs?: DecisionCosts;
  level?: number;
  ciMethod?: ProportionCiMethod;
}

/**
 * CI of the ratio (x1/n1)/(x0/n0) of two independent proportions by the log method:
 * exp(ln LR ± z·√(1/x1 − 1/n1 + 1/x0 − 1/n0)) (Simel, Samsa & Matchar 1991); null when x1 or x0 is 0.
 */
export function likelihoodRatioCi(
  x1: number,
  n1: number,
  x0: number,
  n0: number,
  level = 0.95,
): { lower: number; upper: number } | null {
  if (!(x1 > 0 && x0 > 0 && n1 >= x1 && n0 >= x0)) return null;
  const lr = x1 / n1 / (x0 / n0);
  const se = Math.sqrt(1 / x1 - 1 / n1 + 1 / x0 - 1 / n0);
  const z = qnorm(1 - (1 - level) / 2);
  return { lower: lr * Math.exp(-z * se), upper: lr * Math.exp(z * se) };
}

/** Everything at one threshold in O(log n) from the prepared structure. Proportion CIs: Wilson by default. */
export function atThreshold(prep: PreparedThresholds, t: number, options: AtThresholdOptions = {}): ThresholdMetrics {
  if (Number.isNaN(t)) throw new FulcraError('bad-threshold', 'The threshold must be a number, got NaN.');
  const level = options.level ?? 0.95;
  const m = options.ciMethod ?? 'wilson';
  if (options.costs) checkCosts(options.costs);
  const c = confusionAt(prep, t);
  const sens = proportionCi(c.tp, prep.events, level, m);
  const spec = proportionCi(c.tn, prep.nonEvents, level, m);
  const ratio = (a: number | null, b: number | null) => (a === null || b === null || b === 0 ? null : a / b);
  return {
    threshold: t,
    flagRule: FLAG_RULE,
    ...c,
    sensitivity: sens,
    specificity: spec,
    ppv: proportionCi(c.tp, c.tp + c.fp, level, m),
    npv: proportionCi(c.tn, c.tn + c.fn, level, m),
    fractionFlagged: proportionCi(c.tp + c.fp, prep.total, level, m),
    lrPositive: ratio(sens.estimate, spec.estimate === null ? null : 1 - spec.estimate),
    lrNegative: ratio(sens.estimate === null ? null : 1 - sens.estimate, spec.estimate),
    lrPositiveCi: prep.weighted ? null : likelihoodRatioCi(c.tp, prep.events, c.fp, prep.nonEvents, level),
    lrNegativeCi: prep.weighted ? null : likelihoodRatioCi(c.fn, prep.events, c.tn, prep.nonEvents, level),
    expectedCostPer100: options.costs && prep.total > 0 ? costPer100(c, prep.total, options.costs) : null,
  };
}

export interface CostThresholds {
  /** p* = C_FP / (C_FP + C_FN + B): optimal for calibrated risks. */
  decisionTheory: { threshold: number; assumptions: string[] };
  /**
   * The threshold that minimises the expected cost on these data. Any t in (rangeLower, threshold]
   * gives the same flags. threshold is null when flagging nobody is cheapest.
   */
  empirical: {
    threshold: number | null;
    rangeLower: number | null;
    expectedCostPer100: number;
    flagged: number;
    assumptions: string[];
  };
}

/** Decision-theory threshold p* = C_FP/(C_FP + C_FN + B) (e.g. Pauker & Kassirer 1980, NEJM 302:1109). */
export function decisionTheoryThreshold(costs: DecisionCosts): number {
  checkCosts(costs);
  return costs.falseAlarm / (costs.falseAlarm + costs.missedCase + (costs.truePositiveBenefit ?? 0));
}

/** Both cost-based thresholds with the assumptions each rests on. The empirical scan is O(number of distinct risks). */
export function costThresholds(prep: PreparedThresholds, costs: DecisionCosts): CostThresholds {
  const pStar = decisionTheoryThreshold(costs);
  const K = prep.risks.length;
  let best = costPer100({ tp: 0, fp: 0, fn: prep.events }, prep.total, costs);
  let bestK = K;
  for (let k = K - 1; k >= 0; k--) {
    const tp = prep.eventsAtOrAbove[k];
    const fp = prep.nonEventsAtOrAbove[k];
    const v = costPer100({ tp, fp, fn: prep.events - tp }, prep.total, costs);
    if (v < best - 1e-12 * Math.abs(best)) {
      best = v;
      bestK = k;
    }
  }
  const B = costs.truePositiveBenefit ?? 0;
  return {
    decisionTheory: {
      threshold: pStar,
      assumptions: [
        'The predicted risks are calibrated (a risk of 20% means 20 in 100 such cases have the event).',
        `Each missed event costs ${costs.missedCase}, each false alarm costs ` +
          `${costs.falseAlarm}${B > 0 ? `, and each caught event brings a benefit of ${B}` : ''}, the same for ` +
          `every case.`,
        'Costs are on one scale and add up across cases; nothing else depends on the decision.',
        FLAG_RULE,
      ],
    },
    empirical: {
      threshold: bestK < K ? prep.risks[bestK] : null,
      rangeLower: bestK < K ? (bestK > 0 ? prep.risks[bestK - 1] : 0) : K > 0 ? prep.risks[K - 1] : null,
      expectedCostPer100: best,
      flagged: bestK < K ? prep.eventsAtOrAbove[bestK] + prep.nonEventsAtOrAbove[bestK] : 0,
      assumptions: [
        'The cases here are representative of the cases the threshold will be applied to (same outcome rate, ' +
          'same case mix).',
        'It is chosen on the same data it is judged on, so its expected cost is optimistic; check it on new data.',
        'It does not rely on calibration, but it is noisy in small samples; prefer the decision-theory ' +
          'threshold when the risks are calibrated.',
        'Ties in cost are resolved towards flagging fewer cases.',
        FLAG_RULE,
      ],
    },
  };
}

/** Evenly spaced thresholds from..to (inclusive) with the given step; default 0.01..0.99 by 0.01. */
export function thresholdGrid(from = 0.01, to = 0.99, step = 0.01): Float64Array {
  if (!(step > 0) || !(to >= from))
    throw new FulcraError('bad-grid', `Bad threshold grid: from ${from} to ${to} by ${step}.`);
  const n = Math.floor((to - from) / step + 1e-9) + 1;
  const g = new Float64Array(n);
  for (let i = 0; i < n; i++) g[i] = Math.round((from + i * step) * 1e12) / 1e12;
  return g;
}

/** Expected cost per 100 cases at each threshold of the grid (flag rule risk ≥ t). */
export function expectedCostCurve(
  prep: PreparedThresholds,
  costs: DecisionCosts,
  grid: Float64Array = thresholdGrid(),
): { thresholds: number[]; costPer100: number[] } {
  checkCosts(costs);
  const thresholds = Array.from(grid);
  return { thresholds, costPer100: thresholds.map((t) => costPer100(confusionAt(prep, t), prep.total, costs)) };
}
