import { warning, type EngineWarning } from '../core/warnings';
import { prepareThresholds, type CurveOptions, type PreparedThresholds } from './threshold';

/**
 * Precision–recall curve from the highest threshold down (flag score ≥ threshold), starting at
 * recall 0 with precision 1 (threshold null), and its average precision.
 */
export interface PrCurve {
  recall: number[];
  precision: number[];
  threshold: (number | null)[];
  nPointsFull: number;
  /** AP = Σ (R_k − R_{k−1})·P_k over distinct thresholds, no interpolation; null without events. */
  averagePrecision: number | null;
  /** Precision of a model that ranks at random = outcome rate. */
  baseline: number | null;
  warnings: EngineWarning[];
}

/**
 * PR curve and average precision (step-wise sum, as scikit-learn's average_precision_score;
 * Su, Yuan & Zhu 2015, ICTIR, on why AP and not trapezoids). Thinned to ≤ maxPoints points by recall.
 */
export function prFromPrepared(prep: PreparedThresholds, maxPoints = 500): PrCurve {
  const { risks, eventsAtOrAbove: tp, nonEventsAtOrAbove: fp, events: E, total } = prep;
  const K = risks.length;
  if (E === 0) {
    return {
      recall: [],
      precision: [],
      threshold: [],
      nPointsFull: 0,
      averagePrecision: null,
      baseline: total > 0 ? 0 : null,
      warnings: [
        warning(
          'no-events',
          'There are no events, so precision and recall cannot be measured.',
          'Evaluate on data that contain events.',
        ),
      ],
    };
  }
  let ap = 0;
  let r0 = 0;
  const recall = [0];
  const precision = [1];
  const threshold: (number | null)[] = [null];
  const step = maxPoints < K + 1 ? 1 / Math.max(1, maxPoints - 1) : 0;
  let nextMark = step;
  for (let k = K - 1; k >= 0; k--) {
    if (tp[k] + fp[k] === 0) continue; // zero-weight risks above every weighted case flag nothing
    const r = tp[k] / E;
    const pr = tp[k] / (tp[k] + fp[k]);
    ap += (r - r0) * pr;
    r0 = r;
    if (step === 0 || k === 0 || r >= nextMark) {
      recall.push(r);
      precision.push(pr);
      threshold.push(risks[k]);
      while (step > 0 && nextMark <= r) nextMark += step;
    }
  }
  return { recall, precision, threshold, nPointsFull: K + 1, averagePrecision: ap, baseline: E / total, warnings: [] };
}

/** PR curve of scores (higher = higher risk) for a 0/1 outcome, with optional case weights. */
export function prCurve(y: Float64Array, score: Float64Array, options: CurveOptions = {}): PrCurve {
  return prFromPrepared(prepareThresholds(y, score, options.weights, false), options.maxPoints ?? Infinity);
}
