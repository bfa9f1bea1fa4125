import type { NewtonResult } from './newton';
import { warning, type EngineWarning } from '../core/warnings';

export interface SeparationCheck {
  kind: 'none' | 'complete' | 'quasi';
  /** Design columns (indices into the fitted design) whose coefficients diverge. */
  columns: number[];
  /** Rows whose fitted risk equals the outcome to within 1e-8. */
  determinedRows: number;
}

/**
 * Detects complete and quasi-complete separation (Albert & Anderson 1984, Biometrika 71:1) from a maximum-likelihood
 * Newton run with recordPath: under separation the coefficients move by a roughly constant amount per iteration
 * without converging while some fitted risks reach 0 or 1. Complete: every row is determined; quasi: some are.
 * The diverging columns are those whose change over the last five iterations is at least 5% of the largest
 * (on the standardised scale).
 */
export function detectSeparation(fit: NewtonResult, y: ArrayLike<number>): SeparationCheck {
  const n = y.length;
  let determined = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] === 1 ? 1 - fit.fitted[i] : fit.fitted[i];
    if (r < 1e-8) determined++;
  }
  const path = fit.path ?? [];
  if (fit.converged || determined === 0 || path.length < 2)
    return { kind: 'none', columns: [], determinedRows: determined };
  const a = path[Math.max(0, path.length - 6)],
    b = path[path.length - 1];
  const p = b.length;
  let max = 0;
  for (let j = 1; j < p; j++) max = Math.max(max, Math.abs(b[j] - a[j]));
  if (!(max > 0.5)) return { kind: 'none', columns: [], determinedRows: determined };
  const columns: number[] = [];
  for (let j = 1; j < p; j++) if (Math.abs(b[j] - a[j]) >= 0.05 * max) columns.push(j);
  return { kind: determined === n ? 'complete' : 'quasi', columns, determinedRows: determined };
}

/**
 * The warning for separation (naming the terms of the diverging columns `columns`, original design indices), or
 * for a fit that stopped without converging after `maxIter` iterations; null when neither applies.
 */
export function separationWarning(
  sep: SeparationCheck,
  columns: Set<number>,
  columnTerms: string[],
  n: number,
  converged: boolean,
  maxIter: number,
): EngineWarning | null {
  if (sep.kind === 'none') {
    if (converged) return null;
    return warning(
      'not-converged',
      `The fit did not converge in ${maxIter} iterations.`,
      'Raise the iteration limit (fit option maxIter: Iteration limit on the page, --max-iter in npm run fit), ' +
        'or check for extreme or nearly duplicated predictors.',
    );
  }
  const terms = [...new Set([...columns].map((j) => columnTerms[j]))];
  const what =
    sep.kind === 'complete'
      ? 'complete separation: the predictors split events from non-events perfectly'
      : `quasi-complete separation: ${sep.determinedRows} of ${n} rows are predicted perfectly`;
  return warning(
    sep.kind === 'complete' ? 'complete-separation' : 'quasi-separation',
    `The data show ${what}, so the maximum-likelihood estimates for ${terms.map((t) => `"${t}"`).join(', ')} ` +
      'do not exist (they grow without bound); the values shown for them are where the iterations stopped and ' +
      'have no standard errors.',
    'Refit with the Firth method (bias-reduced, finite estimates) or a ridge penalty, or merge sparse categories.',
    terms,
  );
}
