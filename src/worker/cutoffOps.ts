import { FulcraError } from '../engine/core';
import { atThreshold, costThresholds, expectedCostCurve } from '../engine/evaluation';
import type { Costs, CostView, ThresholdView } from './protocol';
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

/** Cost-optimal cut-offs and the expected-cost curve for one setting of the costs. */
export function costView(s: Session, costs: Costs): CostView {
  const prep = prepared(s);
  const curve = expectedCostCurve(prep, costs);
  return {
    costs,
    optimal: costThresholds(prep, costs),
    curve: curve.thresholds.map((x, i) => ({ x, y: curve.costPer100[i] })),
  };
}
