import { getColumn, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { pchisqUpper } from '../numerics/distributions';
import { sigmoid } from '../numerics/loss';

/**
 * Goodness of fit by covariate pattern (Hosmer, Lemeshow & Sturdivant 2013, Applied Logistic Regression 3rd ed.,
 * §5.2.1): the cases are grouped by their predictor values; for each of the J patterns the observed events E and
 * cases M are set against the fitted M·π. Pearson χ² = Σ (E − Mπ)²/(Mπ(1 − π)); deviance χ² = 2·Σ [E·log(E/(Mπ))
 * + (M − E)·log((M − E)/(M(1 − π)))]; each on J − k degrees of freedom (k coefficients). With one row of a table
 * per pattern the deviance χ² is R's grouped residual deviance.
 */
export interface PatternFit {
  patterns: number;
  cases: number;
  df: number;
  pearson: number;
  pearsonP: number | null;
  deviance: number;
  devianceP: number | null;
  /** Share of the 2J expected counts (Mπ and M(1 − π)) below 5. */
  smallExpectedShare: number;
  /** False when more than 20 % of the expected counts are below 5: the χ² reference is then not trustworthy. */
  reliable: boolean;
  rule: string;
  warnings: EngineWarning[];
}

const RULE =
  'The χ² reference needs most expected counts to be 5 or more: the p-values are marked unreliable when more than ' +
  '20 % of the expected events or non-events per pattern are below 5 (Cochran 1954, Biometrics 10:417; common ' +
  'practice).';

/**
 * patternFit over the rows of `data` the fit used (`scores.rowsUsed`, with their frequency weights and linear
 * predictors); null when there are no more patterns than coefficients (no degrees of freedom).
 */
export function patternFit(
  data: Dataset,
  f: FitResult,
  scores: { y: Float64Array; weights: Float64Array | null; eta: Float64Array; rowsUsed: Int32Array },
): PatternFit | null {
  const cols = [...new Set(f.recipe.terms.flatMap((t) => (t.type === 'interaction' ? [...t.parts] : [t.column])))].map(
    (c) => getColumn(data, c),
  );
  const index = new Map<string, number>();
  const E: number[] = [];
  const M: number[] = [];
  const P: number[] = [];
  const { y, weights, eta, rowsUsed } = scores;
  for (let i = 0; i < y.length; i++) {
    const r = rowsUsed[i];
    let key = '';
    for (const c of cols) key += (c.kind === 'numeric' ? c.values[r] : c.codes[r]) + '\u0001';
    let j = index.get(key);
    if (j === undefined) {
      j = E.length;
      index.set(key, j);
      E.push(0);
      M.push(0);
      P.push(sigmoid(eta[i]));
    }
    const w = weights ? weights[i] : 1;
    E[j] += w * y[i];
    M[j] += w;
  }
  const J = E.length;
  const k = f.coefficients.filter((c) => !c.aliased).length;
  const df = J - k;
  if (df < 1) return null;
  let pearson = 0;
  let deviance = 0;
  let small = 0;
  let cases = 0;
  const t = (o: number, e: number) => (o > 0 ? o * Math.log(o / e) : 0);
  for (let j = 0; j < J; j++) {
    const mu = M[j] * P[j];
    const nu = M[j] * (1 - P[j]);
    cases += M[j];
    pearson += (E[j] - mu) ** 2 / (mu * (1 - P[j]));
    deviance += 2 * (t(E[j], mu) + t(M[j] - E[j], nu));
    if (mu < 5) small++;
    if (nu < 5) small++;
  }
  const smallExpectedShare = small / (2 * J);
  const reliable = smallExpectedShare <= 0.2;
  const warnings: EngineWarning[] = [];
  if (!reliable)
    warnings.push(
      warning(
        'pattern-fit-small-counts',
        `${Math.round(smallExpectedShare * 100)} % of the expected counts of the ${J} covariate patterns are below ` +
          '5, so the goodness-of-fit p-values by pattern are not trustworthy.',
        'Read the calibration curve and slope instead, or merge sparse categories of the table.',
      ),
    );
  const finite = (v: number) => (Number.isFinite(v) ? v : null);
  return {
    patterns: J,
    cases,
    df,
    pearson,
    pearsonP: finite(pchisqUpper(pearson, df)),
    deviance,
    devianceP: finite(pchisqUpper(deviance, df)),
    smallExpectedShare,
    reliable,
    rule: RULE,
    warnings,
  };
}
