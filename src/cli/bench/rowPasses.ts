import { accumulateXtWX, lossGradientRows, ROW_BLOCK } from '../../engine/kernels';

/**
 * The full-data passes of a large-n logistic fit, so they can run on one thread or be split by rows over a pool.
 * Two slots of (η, residual) buffers let a trial point be evaluated without losing the current one.
 */
export interface RowPasses {
  /** −loglik at beta; the gradient X'(y − μ) into g (length p); η and y − μ kept in `slot`. */
  lossGradient(beta: Float64Array, slot: 0 | 1, g: Float64Array): number;
  /** y − μ of the last evaluation in `slot`. */
  residuals(slot: 0 | 1): Float64Array;
  /** Exact X'WX, W = μ(1 − μ) from the residuals in `slot`, into out (row-major p×p); η of the slot is overwritten. */
  information(slot: 0 | 1, out: Float64Array): Float64Array;
}

/** Single-thread RowPasses. */
export function serialPasses(X: Float64Array, n: number, p: number, y: Float64Array): RowPasses {
  const eta = [new Float64Array(n), new Float64Array(n)], r = [new Float64Array(n), new Float64Array(n)];
  const work = new Float64Array(ROW_BLOCK * p);
  return {
    lossGradient(beta, slot, g) {
      g.fill(0);
      return lossGradientRows(X, n, p, y, beta, 0, n, eta[slot], r[slot], g);
    },
    residuals: (slot) => r[slot],
    information(slot, out) {
      // The weights overwrite η of this slot (not needed again), saving a length-n buffer.
      const rs = r[slot], w = eta[slot];
      for (let i = 0; i < n; i++) { const mu = y[i] - rs[i]; w[i] = mu * (1 - mu); }
      return accumulateXtWX(X, n, p, w, out, work);
    },
  };
}
