import { drawLinear, rowDot, type ImputationDesign } from './imputeModels';
import type { Rng } from '../numerics/rng';

export interface PmmResult {
  /** Imputed values for the rows `mis`, each an observed value of a donor. */
  values: Float64Array;
  /** Predictor columns dropped as aliased in the linear model. */
  aliased: number;
}

/**
 * Predictive mean matching with type-1 matching (van Buuren 2018, FIMD 2nd ed. §3.4; mice's "pmm"):
 * fit least squares on the observed rows, draw β* from its posterior, predict observed rows with β̂ and
 * missing rows with β*, and for each missing row take the observed value of one of the `donors` observed
 * rows with the closest predictions, chosen at random. Ties are broken at random (observed rows are
 * shuffled before sorting).
 */
export function pmmImpute(
  design: ImputationDesign,
  y: Float64Array,
  obs: Int32Array,
  mis: Int32Array,
  rng: Rng,
  donors = 5,
): PmmResult {
  const draw = drawLinear(design, y, obs, rng);
  const no = obs.length;
  const order = Int32Array.from(obs);
  for (let i = no - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    const t = order[i];
    order[i] = order[j];
    order[j] = t;
  }
  const pred = new Float64Array(no);
  for (let r = 0; r < no; r++) pred[r] = rowDot(design, order[r], draw.coef);
  const pos: number[] = new Array(no);
  for (let r = 0; r < no; r++) pos[r] = r;
  pos.sort((a, b) => pred[a] - pred[b]);
  const sorted = new Int32Array(no),
    yhat = new Float64Array(no);
  for (let r = 0; r < no; r++) {
    sorted[r] = order[pos[r]];
    yhat[r] = pred[pos[r]];
  }
  const k = Math.max(1, Math.min(donors, no));
  const values = new Float64Array(mis.length);
  for (let r = 0; r < mis.length; r++) {
    const target = rowDot(design, mis[r], draw.beta);
    let lo = 0,
      hi = no;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (yhat[mid] < target) lo = mid + 1;
      else hi = mid;
    }
    // Expand the window [left, right) around the insertion point to the k closest predictions.
    let left = lo,
      right = lo;
    while (right - left < k) {
      if (left === 0) right++;
      else if (right === no) left--;
      else if (target - yhat[left - 1] <= yhat[right] - target) left--;
      else right++;
    }
    values[r] = y[sorted[left + rng.int(k)]];
  }
  return { values, aliased: draw.aliased };
}
