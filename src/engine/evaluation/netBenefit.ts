import { FulcraError } from '../core/data';
import { confusionAt, thresholdGrid, type PreparedThresholds } from './threshold';

/** Net benefit of treating everyone at threshold probability pt when the outcome rate is `prevalence`. */
export function netBenefitTreatAll(prevalence: number, pt: number): number {
  return prevalence - (1 - prevalence) * (pt / (1 - pt));
}

/**
 * Decision curve (Vickers & Elkin 2006, Med Decis Making 26:565): at each threshold pt (flag risk ≥ pt)
 * net benefit = TP/n − FP/n · pt/(1 − pt) for the model, treat-all and treat-none (0), and interventions
 * avoided per 100 = (NB_model − NB_all) / (pt/(1 − pt)) · 100 (Vickers et al. 2008, BMC Med Inform Decis Mak 8:53).
 */
export interface DecisionCurve {
  thresholds: number[];
  model: number[];
  treatAll: number[];
  treatNone: number[];
  interventionsAvoidedPer100: number[];
  prevalence: number;
}

export function decisionCurve(prep: PreparedThresholds, grid: Float64Array = thresholdGrid()): DecisionCurve {
  for (const t of grid) {
    if (!(t > 0 && t < 1))
      throw new FulcraError('bad-threshold', `Decision-curve thresholds must lie strictly between 0 and 1, got ${t}.`);
  }
  const n = prep.total;
  const prevalence = n > 0 ? prep.events / n : 0;
  const thresholds = Array.from(grid);
  const model: number[] = [];
  const treatAll: number[] = [];
  const avoided: number[] = [];
  for (const t of thresholds) {
    const odds = t / (1 - t);
    const c = n > 0 ? confusionAt(prep, t) : { tp: 0, fp: 0 };
    const nb = n > 0 ? c.tp / n - (c.fp / n) * odds : 0;
    const all = netBenefitTreatAll(prevalence, t);
    model.push(nb);
    treatAll.push(all);
    avoided.push(((nb - all) / odds) * 100);
  }
  return {
    thresholds,
    model,
    treatAll,
    treatNone: thresholds.map(() => 0),
    interventionsAvoidedPer100: avoided,
    prevalence,
  };
}
