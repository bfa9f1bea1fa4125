import { oddsRatio } from '../fitting/oddsRatio';
import { FulcraError } from '../core/data';
import { pfUpper, pt, qt } from '../numerics/distributions';
import { cholesky, choleskyInverse } from '../numerics/linalg';
import type { CoefficientRow, FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';

/** Rubin's rules for one parameter, with the columns mice::pool reports. */
export interface PooledEstimate {
  name: string;
  /** Number of imputations pooled. */
  m: number;
  /** Mean of the per-imputation estimates (q̄). */
  estimate: number;
  /** Within-imputation variance: mean of the squared standard errors (ū). */
  within: number;
  /** Between-imputation variance: sample variance of the estimates (b). */
  between: number;
  /** Total variance t = ū + (1 + 1/m)·b. */
  total: number;
  se: number;
  /** Complete-data degrees of freedom used in the Barnard–Rubin adjustment (Infinity = large sample). */
  dfcom: number;
  df: number;
  /** t statistic estimate/se and its two-sided p-value on df degrees of freedom. */
  statistic: number;
  p: number;
  lower: number;
  upper: number;
  /** Relative increase in variance due to nonresponse, (1 + 1/m)·b/ū. */
  riv: number;
  /** Proportion of the total variance due to missingness, (1 + 1/m)·b/t. */
  lambda: number;
  /** Fraction of missing information, (riv + 2/(df + 3))/(riv + 1). */
  fmi: number;
}

export interface RubinInput {
  /** m × p: estimates[k][j] is parameter j in imputation k. */
  estimates: ArrayLike<number>[];
  /** m × p: squared standard errors, same layout. */
  variances: ArrayLike<number>[];
  /** Complete-data residual df (n − number of estimated parameters); Infinity for the large-sample rule. */
  dfcom: number;
  /** Parameter names; "b1", "b2"… when omitted. */
  names?: string[];
  /** Confidence level of the t intervals (default 0.95). */
  level?: number;
}

export interface RubinResult {
  rows: PooledEstimate[];
  warnings: EngineWarning[];
}

/**
 * Barnard & Rubin (1999, Biometrika 86:948) small-sample degrees of freedom, exactly as mice::pool
 * computes them (λ floored at 1e-4; ν_old = (m−1)/λ², ν_obs = (ν_com+1)/(ν_com+3)·ν_com·(1−λ)).
 */
export function barnardRubinDf(m: number, between: number, total: number, dfcom: number): number {
  const lambda = Math.max(((1 + 1 / m) * between) / total, 1e-4);
  const dfOld = (m - 1) / (lambda * lambda);
  if (dfcom === Infinity) return dfOld;
  const dfObs = ((dfcom + 1) / (dfcom + 3)) * dfcom * (1 - lambda);
  return (dfOld * dfObs) / (dfOld + dfObs);
}

/**
 * Pools per-imputation estimates and squared standard errors by Rubin's rules (Rubin 1987, Multiple
 * Imputation for Nonresponse in Surveys, ch. 3) with Barnard–Rubin df, t-based intervals and p-values,
 * matching mice::pool / summary.mipo (van Buuren & Groothuis-Oudshoorn 2011, J Stat Softw 45(3)).
 * Needs m ≥ 2 imputations of equal length.
 */
export function poolRubin(input: RubinInput): RubinResult {
  const { estimates, variances } = input;
  const m = estimates.length;
  const level = input.level ?? 0.95;
  if (m < 2) throw new FulcraError('too-few-imputations', `Pooling needs at least 2 imputations; got ${m}.`);
  if (variances.length !== m)
    throw new FulcraError('bad-argument', `Got ${m} sets of estimates but ${variances.length} sets of variances.`);
  const p = estimates[0].length;
  for (let k = 0; k < m; k++)
    if (estimates[k].length !== p || variances[k].length !== p)
      throw new FulcraError(
        'bad-argument',
        `Imputation ${k + 1} has a different number of parameters than the first (${p}).`,
      );
  if (!(input.dfcom > 0)) throw new FulcraError('bad-argument', `dfcom must be positive; got ${input.dfcom}.`);
  if (!(level > 0 && level < 1)) throw new FulcraError('bad-argument', `level must be in (0, 1); got ${level}.`);
  const dfcom = Math.max(input.dfcom, 1);
  const names = input.names ?? Array.from({ length: p }, (_, j) => `b${j + 1}`);
  const warnings: EngineWarning[] = [];
  const bad: string[] = [];
  const rows: PooledEstimate[] = [];
  for (let j = 0; j < p; j++) {
    let qbar = 0,
      ubar = 0;
    for (let k = 0; k < m; k++) {
      qbar += estimates[k][j];
      ubar += variances[k][j];
    }
    qbar /= m;
    ubar /= m;
    let ss = 0;
    for (let k = 0; k < m; k++) ss += (estimates[k][j] - qbar) ** 2;
    const b = ss / (m - 1);
    const t = ubar + (1 + 1 / m) * b;
    if (!Number.isFinite(t) || !Number.isFinite(qbar)) bad.push(names[j]);
    const df = barnardRubinDf(m, b, t, dfcom);
    const riv = ((1 + 1 / m) * b) / ubar;
    const se = Math.sqrt(t);
    const statistic = qbar / se;
    const tq = qt((1 + level) / 2, df);
    rows.push({
      name: names[j],
      m,
      estimate: qbar,
      within: ubar,
      between: b,
      total: t,
      se,
      dfcom,
      df,
      statistic,
      p: 2 * pt(-Math.abs(statistic), Math.max(df, 0.001)),
      lower: qbar - tq * se,
      upper: qbar + tq * se,
      riv,
      lambda: ((1 + 1 / m) * b) / t,
      fmi: (riv + 2 / (df + 3)) / (riv + 1),
    });
  }
  if (bad.length > 0)
    warnings.push(
      warning(
        'mi-nonfinite',
        `Some imputations gave no finite estimate or variance for ${bad.join(', ')}, so the pooled values are ` +
          `not usable.`,
        'Look at the fits on the completed datasets: a term may be separated or aliased in some imputations.',
        bad,
      ),
    );
  return { rows, warnings };
}

/** A coefficient row of FitResult with the pooled values and the multiple-imputation columns. */
export interface PooledCoefficientRow extends CoefficientRow {
  /** Pooled t statistic (estimate / se) referred to a t distribution on `df`; `z` holds the same number. */
  t: number | null;
  m: number;
  within: number | null;
  between: number | null;
  total: number | null;
  dfcom: number;
  df: number | null;
  riv: number | null;
  lambda: number | null;
  fmi: number | null;
}

/** Pooled D1 test of one model term (all its design columns zero); null where some fit lacks a covariance. */
export interface PooledTermTest {
  name: string;
  /** Indices into `coefficients`. */
  columns: number[];
  test: PooledWaldTest | null;
}

export interface PooledCoefficients {
  m: number;
  level: number;
  dfcom: number;
  coefficients: PooledCoefficientRow[];
  terms: PooledTermTest[];
  /** m × p per-imputation estimates and squared standard errors (null where the fit gave none). */
  estimates: number[][];
  variances: (number | null)[][];
  warnings: EngineWarning[];
}

/**
 * Pools the coefficient tables of fits of one model to m completed datasets by Rubin's rules (see poolRubin):
 * dfcom = nUsed − number of estimated (non-aliased) coefficients of the first fit, as mice::pool takes the
 * residual df of a glm. A coefficient aliased in any imputation, or without standard errors (ridge), gets the
 * mean estimate and null inference, with a warning. `waldLower/waldUpper` hold the pooled t intervals.
 * Each model term also gets the pooled D1 Wald test of all its columns (see poolWaldTest).
 */
export function poolCoefficients(fits: FitResult[], level = 0.95): PooledCoefficients {
  const m = fits.length;
  if (m < 2) throw new FulcraError('too-few-imputations', `Pooling needs at least 2 fits; got ${m}.`);
  const names = fits[0].coefficients.map((c) => c.name);
  fits.forEach((f, k) => {
    const other = f.coefficients.map((c) => c.name);
    if (other.join('\u0000') !== names.join('\u0000'))
      throw new FulcraError(
        'bad-argument',
        `Fit ${k + 1} has coefficients ${other.join(', ')}, unlike the first fit (${names.join(', ')}).`,
      );
  });
  const estimates = fits.map((f) => f.coefficients.map((c) => c.estimate));
  const variances = fits.map((f) => f.coefficients.map((c) => (c.se === null ? null : c.se * c.se)));
  const usable = names.map((_, j) => fits.every((f) => !f.coefficients[j].aliased && f.coefficients[j].se !== null));
  const estimated = fits[0].coefficients.filter((c) => !c.aliased).length;
  const dfcom = Math.max(fits[0].nUsed - estimated, 1);
  const idx = names.map((_, j) => j).filter((j) => usable[j]);
  const pooled =
    idx.length > 0
      ? poolRubin({
          estimates: estimates.map((e) => idx.map((j) => e[j])),
          variances: variances.map((v) => idx.map((j) => v[j] as number)),
          dfcom,
          level,
          names: idx.map((j) => names[j]),
        })
      : { rows: [], warnings: [] };
  const warnings = [...pooled.warnings];
  const coefficients = names.map((name, j): PooledCoefficientRow => {
    const first = fits[0].coefficients[j];
    const r = pooled.rows[idx.indexOf(j)];
    const mean = estimates.reduce((s, e) => s + e[j], 0) / m;
    if (!r) {
      return {
        ...first,
        estimate: mean,
        se: null,
        z: null,
        p: null,
        waldLower: null,
        waldUpper: null,
        profileLower: null,
        profileUpper: null,
        oddsRatio: oddsRatio(mean),
        aliased: fits.some((f) => f.coefficients[j].aliased),
        t: null,
        m,
        within: null,
        between: null,
        total: null,
        dfcom,
        df: null,
        riv: null,
        lambda: null,
        fmi: null,
      };
    }
    return {
      name,
      term: first.term,
      estimate: r.estimate,
      se: r.se,
      z: r.statistic,
      p: r.p,
      waldLower: r.lower,
      waldUpper: r.upper,
      profileLower: null,
      profileUpper: null,
      oddsRatio: oddsRatio(r.estimate),
      aliased: false,
      t: r.statistic,
      m,
      within: r.within,
      between: r.between,
      total: r.total,
      dfcom,
      df: r.df,
      riv: r.riv,
      lambda: r.lambda,
      fmi: r.fmi,
    };
  });
  const aliasedSome = names.filter((_, j) => fits.some((f) => f.coefficients[j].aliased));
  if (aliasedSome.length > 0)
    warnings.push(
      warning(
        'mi-aliased',
        `${aliasedSome.join(', ')} could not be estimated (aliased) in at least one imputed dataset, so no ` +
          `pooled inference is given for them.`,
        'Merge sparse categories or drop the redundant term.',
        aliasedSome,
      ),
    );
  const noSe = names.filter(
    (_, j) => !aliasedSome.includes(names[j]) && fits.some((f) => f.coefficients[j].se === null),
  );
  if (noSe.length > 0)
    warnings.push(
      warning(
        'mi-no-inference',
        `The fits give no standard error for ${noSe.join(', ')} in at least one imputed dataset (a penalised ` +
          `fit, or a term that separates the outcome), so only the mean of the estimates is reported, without ` +
          `intervals or p-values.`,
        'Use maximum likelihood or Firth fitting for pooled inference, and check the terms for separation.',
        noSe,
      ),
    );
  const terms = fits[0].terms.map((t): PooledTermTest => {
    const cols = t.columns;
    const ok = cols.length > 0 && cols.every((j) => usable[j]) && fits.every((f) => f.covariance !== null);
    if (!ok) return { name: t.name, columns: cols, test: null };
    const p = names.length;
    const test = poolWaldTest(
      fits.map((f) => cols.map((j) => f.coefficients[j].estimate)),
      fits.map((f) => cols.flatMap((a) => cols.map((c) => (f.covariance as ArrayLike<number>)[a * p + c]))),
    );
    return { name: t.name, columns: cols, test };
  });
  return { m, level, dfcom, coefficients, terms, estimates, variances, warnings };
}

export interface PooledWaldTest {
  /** D1 = q̄'Ū⁻¹q̄ / (k·(1 + r)), referred to F(df1, df2). */
  statistic: number;
  df1: number;
  df2: number;
  /** Average relative increase in variance r = (1 + 1/m)·tr(B·Ū⁻¹)/k. */
  riv: number;
  p: number;
}

/**
 * Pooled multivariate Wald test (D1) that k parameters are all zero, from m estimate vectors and their k×k
 * row-major covariance matrices (Li, Raghunathan & Rubin 1991, JASA 86:1065; van Buuren 2018, FIMD 2nd ed.
 * §5.3.3), with their denominator df: t = k(m−1); 4 + (t−4)(1 + (1 − 2/t)/r)² if t > 4, else
 * t(1 + 1/k)(1 + 1/r)²/2. When the imputations agree (r = 0) df2 is infinite and k·D1 is referred to χ²(k).
 */
export function poolWaldTest(estimates: ArrayLike<number>[], covariances: ArrayLike<number>[]): PooledWaldTest {
  const m = estimates.length;
  if (m < 2) throw new FulcraError('too-few-imputations', `Pooling needs at least 2 imputations; got ${m}.`);
  const k = estimates[0].length;
  if (k < 1) throw new FulcraError('bad-argument', 'The test needs at least one parameter.');
  if (covariances.length !== m || covariances.some((c) => c.length !== k * k) || estimates.some((e) => e.length !== k))
    throw new FulcraError(
      'bad-argument',
      `Expected ${m} estimate vectors of length ${k} and ${m} covariance matrices of length ${k * k}.`,
    );
  const qbar = new Float64Array(k),
    ubar = new Float64Array(k * k),
    b = new Float64Array(k * k);
  for (let i = 0; i < m; i++) for (let a = 0; a < k; a++) qbar[a] += estimates[i][a] / m;
  for (let i = 0; i < m; i++) {
    for (let a = 0; a < k * k; a++) ubar[a] += covariances[i][a] / m;
    for (let a = 0; a < k; a++)
      for (let c = 0; c < k; c++) b[a * k + c] += ((estimates[i][a] - qbar[a]) * (estimates[i][c] - qbar[c])) / (m - 1);
  }
  const ch = cholesky(ubar, k, 1e-12);
  if (ch.rank < k) return { statistic: NaN, df1: k, df2: NaN, riv: NaN, p: NaN };
  const inv = choleskyInverse(ch);
  let trace = 0,
    quad = 0;
  for (let a = 0; a < k; a++)
    for (let c = 0; c < k; c++) {
      trace += b[a * k + c] * inv[c * k + a];
      quad += qbar[a] * inv[a * k + c] * qbar[c];
    }
  const riv = ((1 + 1 / m) * trace) / k;
  const statistic = quad / (k * (1 + riv));
  const t = k * (m - 1);
  const df2 =
    riv === 0
      ? Infinity
      : t > 4
        ? 4 + (t - 4) * (1 + (1 - 2 / t) / riv) ** 2
        : (t * (1 + 1 / k) * (1 + 1 / riv) ** 2) / 2;
  return { statistic, df1: k, df2, riv, p: pfUpper(statistic, k, df2) };
}
