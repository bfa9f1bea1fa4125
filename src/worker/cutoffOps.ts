import { FulcraError } from '../engine/core';
import { atThreshold, costThresholds, expectedCostCurve } from '../engine/evaluation';
import type { Costs, CostView, ThresholdView } from './protocol';
import { CUTOFF_WINDOW_RULE, cutoffWindow, riskBins } from './riskBins';
import type { Session } from './session';

function prepared(s: Session) {
  if (!s.prepared) throw new FulcraError('no-model', 'No model has been fitted yet.', 'Fit a model first.');
  return s.prepared;
}

/** The O(log n) query behind the cut-off slider. */
export function thresholdAt(s: Session, t: number, costs: Costs): ThresholdView {
  const prep = prepared(s);
  const metrics = atThreshold(prep, t, { costs });
  const n = prep.total;
  const netBenefit = t < 1 ? metrics.tp / n - (metrics.fp / n) * (t / (1 - t)) : NaN;
  return { metrics, netBenefit, costs };
}

/**
 * Cost-optimal cut-offs and the expected-cost curve for one setting of the costs, with the binned risks of cases
 * with and without the event (0–1 and, finer, in the window where the cost changes; never the risks themselves).
 */
export function costView(s: Session, costs: Costs): CostView {
  const prep = prepared(s);
  const points = (c: { thresholds: number[]; costPer100: number[] }) =>
    c.thresholds.map((x, i) => ({ x, y: c.costPer100[i] }));
  const optimal = costThresholds(prep, costs);
  const { from, to } = cutoffWindow(prep, [optimal.decisionTheory.threshold, optimal.empirical.threshold]);
  const grid = Float64Array.from({ length: 121 }, (_, i) => from + ((to - from) * i) / 120);
  return {
    costs,
    optimal,
    curve: points(expectedCostCurve(prep, costs)),
    distribution: riskBins(prep, 0, 1, 50),
    zoom: {
      from,
      to,
      rule: CUTOFF_WINDOW_RULE,
      curve: points(expectedCostCurve(prep, costs, grid)),
      distribution: riskBins(prep, from, to, 40),
    },
  };
}
