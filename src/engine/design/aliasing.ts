import { cholesky, choleskySolve } from '../numerics/linalg';
import { allocF64, createRowPasses } from '../numerics/rowPool';
import { warning, type EngineWarning } from '../core/warnings';

export interface Aliasing {
  /** true for columns that are (numerically) linear combinations of earlier columns. */
  aliased: boolean[];
  warnings: EngineWarning[];
}

/**
 * Finds aliased design columns by a Cholesky factorisation of X'X in column order (intercept first): a column is
 * aliased when 1 − R² of its regression on the earlier kept columns is below `tol`. X should be centred and
 * scaled (standardise.ts) so that the tolerance is scale free. Each aliased column gets an 'aliased' warning
 * naming the columns it duplicates (or saying it is constant). X'X is the row passes' information pass with unit
 * weights (fixed chunks summed in order, shared by the row pool's threads when X is in its memory).
 */
export function findAliased(
  X: Float64Array,
  n: number,
  p: number,
  names: string[],
  terms: string[],
  tol = 1e-9,
): Aliasing {
  const w = allocF64(n).fill(1);
  const xtx = createRowPasses(X, n, p, undefined, undefined, undefined).information(w, new Float64Array(p * p));
  const ch = cholesky(xtx, p, tol);
  const aliased = Array.from(ch.dropped, (d) => d === 1);
  const warnings: EngineWarning[] = [];
  for (let j = 0; j < p; j++) {
    if (!aliased[j]) continue;
    let constant = true;
    for (let i = 1; i < n && constant; i++) if (X[j * n + i] !== X[j * n]) constant = false;
    if (constant && j > 0) {
      warnings.push(
        warning(
          'aliased',
          `"${names[j]}" has the same value in every row used, so its effect cannot be estimated; it was left out.`,
          'Remove it from the model.',
          [terms[j]],
        ),
      );
      continue;
    }
    // Regression of column j on the earlier kept columns: the non-zero coefficients name what it duplicates.
    const sub = cholesky(principal(xtx, p, j), j, tol);
    const rhs = Float64Array.from({ length: j }, (_, k) => xtx[k * p + j]);
    const b = choleskySolve(sub, rhs);
    const scale = Math.max(...Array.from(b, Math.abs), 0);
    const parts = [];
    for (let k = 0; k < j; k++) if (!aliased[k] && Math.abs(b[k]) > 1e-6 * scale) parts.push(names[k]);
    const what =
      parts.length === 1
        ? `a copy of "${parts[0]}"`
        : `a linear combination of ${parts.map((s) => `"${s}"`).join(', ')}`;
    warnings.push(
      warning(
        'aliased',
        `"${names[j]}" is ${what} (up to scale and shift), so its effect cannot be told apart; it was left out.`,
        'Remove one of the duplicated predictors.',
        [...new Set([terms[j], ...parts.map((s) => terms[names.indexOf(s)])])],
      ),
    );
  }
  return { aliased, warnings };
}

function principal(A: Float64Array, p: number, m: number): Float64Array {
  const out = new Float64Array(m * m);
  for (let i = 0; i < m; i++) for (let k = 0; k < m; k++) out[i * m + k] = A[i * p + k];
  return out;
}
