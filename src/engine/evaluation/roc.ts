import { warning, type EngineWarning } from '../core/warnings';
import { prepareThresholds, type CurveOptions, type PreparedThresholds } from './threshold';

/**
 * ROC curve from the highest threshold down: point j is (fpr, tpr) when flagging score ≥ threshold[j];
 * the first point (0, 0) has threshold +Infinity (flag nobody) and is stored as null.
 */
export interface RocCurve {
  fpr: number[];
  tpr: number[];
  threshold: (number | null)[];
  /** Points on the full curve (distinct scores + 1) before thinning. */
  nPointsFull: number;
  /**
   * Area under the curve = Mann–Whitney probability P(score_event > score_non-event) + ½·P(tie); null with one
   * class.
   */
  auc: number | null;
  events: number;
  nonEvents: number;
  warnings: EngineWarning[];
}

/** Warnings shared by every discrimination measure: one class absent or tiny, all scores tied. */
export function discriminationWarnings(
  events: number,
  nonEvents: number,
  distinct: number,
  eventsLabel = 'events',
): EngineWarning[] {
  const w: EngineWarning[] = [];
  if (events === 0 || nonEvents === 0) {
    w.push(
      warning(
        'one-class-only',
        `There are no ${events === 0 ? eventsLabel : 'non-events'}, so discrimination (AUC, ROC) cannot be measured.`,
        'Evaluate on data that contain both events and non-events.',
      ),
    );
  } else if (events < 2 || nonEvents < 2) {
    w.push(
      warning(
        'class-too-small',
        `There is only one ${events < 2 ? eventsLabel.replace(/s$/, '') : 'non-event'}; the AUC is shown but ` +
          `has no standard error or confidence interval.`,
        'Evaluate on more data; an AUC from one case of a class says almost nothing.',
      ),
    );
  }
  if (distinct === 1 && events > 0 && nonEvents > 0) {
    w.push(
      warning(
        'scores-all-tied',
        'Every case has the same predicted risk, so the model does not rank cases at all (AUC = 0.5 by ties).',
        'Check that the model has predictors and that the right column was chosen as the prediction.',
      ),
    );
  }
  return w;
}

/**
 * ROC curve and AUC from a prepared threshold structure. The AUC is the trapezoid area, identical to
 * the Mann–Whitney U statistic with ties counted ½ (Hanley & McNeil 1982, Radiology 143:29).
 * Thinned to at most `maxPoints` points (evenly spaced along the curve's length, ends kept) for display.
 */
export function rocFromPrepared(prep: PreparedThresholds, maxPoints = 500): RocCurve {
  const { risks, eventsAtOrAbove: tp, nonEventsAtOrAbove: fp, events: E, nonEvents: N } = prep;
  const K = risks.length;
  const warnings = discriminationWarnings(E, N, K);
  if (E === 0 || N === 0) {
    return { fpr: [], tpr: [], threshold: [], nPointsFull: 0, auc: null, events: E, nonEvents: N, warnings };
  }
  let auc = 0;
  let x0 = 0;
  let y0 = 0;
  let length = 0;
  for (let k = K - 1; k >= 0; k--) {
    const x = fp[k] / N;
    const y = tp[k] / E;
    auc += ((x - x0) * (y + y0)) / 2;
    length += Math.hypot(x - x0, y - y0);
    x0 = x;
    y0 = y;
  }
  const fpr = [0];
  const tpr = [0];
  const threshold: (number | null)[] = [null];
  const keepAll = !(maxPoints < K + 1);
  const step = length / Math.max(1, maxPoints - 1);
  let walked = 0;
  let nextMark = step;
  x0 = 0;
  y0 = 0;
  for (let k = K - 1; k >= 0; k--) {
    const x = fp[k] / N;
    const y = tp[k] / E;
    walked += Math.hypot(x - x0, y - y0);
    x0 = x;
    y0 = y;
    if (keepAll || k === 0 || walked >= nextMark) {
      fpr.push(x);
      tpr.push(y);
      threshold.push(risks[k]);
      while (!keepAll && nextMark <= walked) nextMark += step;
    }
  }
  return {
    fpr,
    tpr,
    threshold,
    nPointsFull: K + 1,
    auc: Math.min(1, Math.max(0, auc)),
    events: E,
    nonEvents: N,
    warnings,
  };
}

/** ROC curve and AUC of scores (higher score = higher risk) for a 0/1 outcome, with optional case weights. */
export function rocCurve(y: Float64Array, score: Float64Array, options: CurveOptions = {}): RocCurve {
  return rocFromPrepared(prepareThresholds(y, score, options.weights, false), options.maxPoints ?? Infinity);
}
