import { plural } from '../core/wording';
import { FulcraError, getColumn, isMissing, rowNumbering, type Column, type Dataset } from '../core/data';
import { sigmoid } from '../numerics/loss';
import { imputeCategorical, drawLogistic, rowDot, type ImputationDesign } from './imputeModels';
import { modelColumns } from './missingReport';
import type { ModelSpec } from '../core/model';
import { pmmImpute } from './pmm';
import { createRng } from '../numerics/rng';
import { warning, type EngineWarning } from '../core/warnings';

export interface MiceOptions {
  /** Number of imputed datasets. */
  m: number;
  /** Gibbs iterations per chain (0 leaves the random starting draws). */
  maxit: number;
  seed: number;
  /** Donor pool size of predictive mean matching. */
  donors: number;
  /** Extra columns used as predictors (and imputed if incomplete) but not in the model. */
  auxiliary: string[];
}

export const defaultMiceOptions: MiceOptions = { m: 10, maxit: 10, seed: 1, donors: 5, auxiliary: [] };

const limits: Array<[keyof MiceOptions, number, number]> = [
  ['m', 1, 1000],
  ['maxit', 0, 1000],
  ['donors', 1, 100],
];

export type ImputationMethod = 'pmm' | 'logistic' | 'multinomial';

export interface ImputedColumn {
  column: string;
  method: ImputationMethod;
  /** Rows whose value was missing, ascending. */
  rows: Int32Array;
  /** m arrays aligned with `rows`: the imputed value (numeric) or level code (categorical). */
  draws: Float64Array[];
  /** m × maxit mean of the imputed values (level codes for categorical columns) after each iteration. */
  chainMean: number[][];
}

export interface MiceResult {
  m: number;
  maxit: number;
  seed: number;
  donors: number;
  /** Columns in the imputation model (model columns, then auxiliary ones). */
  columns: string[];
  imputed: ImputedColumn[];
  warnings: EngineWarning[];
}

export interface MiceHooks {
  onProgress?(done: number, total: number): void;
  signal?: { aborted: boolean };
  tick?: () => Promise<void>;
}

interface Var {
  col: Column;
  values: Float64Array;
  obs: Int32Array;
  mis: Int32Array;
  method: ImputationMethod;
  levels: number;
  mean: number;
  sd: number;
}

/**
 * Multiple imputation by chained equations (van Buuren & Groothuis-Oudshoorn 2011, J Stat Softw 45(3)):
 * every incomplete column among the model's columns (outcome included) and `auxiliary` is imputed from all
 * the others, in column order, for `maxit` iterations per chain, m independent chains seeded from `seed`.
 * Numeric columns: predictive mean matching (type 1, `donors` donors); numeric 0/1 and two-level columns:
 * logistic regression with a parameter draw; more levels: separate baseline-category logits (see
 * imputeCategorical). Starting values are random draws from the observed values. Predictors enter linearly
 * (numeric ones standardised, categorical ones as indicators).
 */
export async function mice(
  data: Dataset,
  spec: ModelSpec,
  options: Partial<MiceOptions> = {},
  hooks: MiceHooks = {},
): Promise<MiceResult> {
  const opt = { ...defaultMiceOptions, ...options };
  for (const [key, lo, hi] of limits) {
    const v = opt[key] as number;
    if (!Number.isInteger(v) || v < lo || v > hi)
      throw new FulcraError('bad-argument', `${key} must be an integer from ${lo} to ${hi}; got ${v}.`);
  }
  if (!Number.isFinite(opt.seed))
    throw new FulcraError('bad-argument', `seed must be a finite number; got ${opt.seed}.`);
  const columns = [...modelColumns(spec)];
  for (const a of opt.auxiliary) if (!columns.includes(a)) columns.push(a);
  const warnings: EngineWarning[] = [];
  const vars: Var[] = [];
  for (const name of columns) {
    const v = prepare(getColumn(data, name), data.nRows);
    if (v.obs.length === 0) {
      warnings.push(
        warning(
          'mi-no-observed',
          `Column "${name}" has no observed values, so it can neither be imputed nor used to impute others.`,
          'Remove this column from the model (or from the auxiliary columns).',
          [name],
        ),
      );
      continue;
    }
    vars.push(v);
  }
  const targets = vars.filter((v) => v.mis.length > 0);
  if (targets.length === 0)
    warnings.push(
      warning(
        'mi-nothing-missing',
        'No value is missing in the columns of the model, so every imputed dataset equals the data.',
        'Fit the model directly.',
      ),
    );
  const outcome = targets.find((v) => v.col.name === spec.outcome);
  if (outcome)
    warnings.push(
      warning(
        'mi-outcome-imputed',
        `The outcome "${spec.outcome}" is missing in ${plural(outcome.mis.length, 'row')}; ` +
          `${outcome.mis.length === 1 ? 'it is' : 'these are'} imputed and used in the fits.`,
        'Consider also fitting without the rows whose outcome was imputed (the option to exclude them from the ' +
          'fits; von Hippel 2007, Sociol Methodol 37:83).',
        [spec.outcome],
      ),
    );
  const nonlinear = spec.terms.filter(
    (t) =>
      t.type !== 'main' &&
      (t.type === 'spline' ? [t.column] : t.columns).some((c) => targets.some((v) => v.col.name === c)),
  );
  if (nonlinear.length > 0) {
    const cols = [
      ...new Set(
        nonlinear.flatMap((t) => (t.type === 'spline' ? [t.column] : t.type === 'interaction' ? t.columns : [])),
      ),
    ];
    warnings.push(
      warning(
        'mi-nonlinear-terms',
        `The imputation models are linear in ${cols.join(', ')}, but the model has spline or interaction terms ` +
          `in them; imputed values do not carry these curves or interactions, which biases their estimates ` +
          `towards none.`,
        'Treat these estimates with caution; for an interaction with a grouping column, impute and fit each ' +
          'group separately.',
        cols,
      ),
    );
  }

  const rng = createRng(opt.seed);
  const total = opt.m * opt.maxit;
  let done = 0;
  const draws = targets.map(() => [] as Float64Array[]);
  const chainMean = targets.map(() => [] as number[][]);
  const notConverged = new Array<number>(targets.length).fill(0);
  const aliased = new Array<number>(targets.length).fill(0);
  for (let k = 0; k < opt.m; k++) {
    if (hooks.signal?.aborted) throw new FulcraError('cancelled', 'Imputation was cancelled.');
    const state = vars.map((v) => Float64Array.from(v.values));
    for (const t of targets) {
      const s = state[vars.indexOf(t)];
      for (const i of t.mis) s[i] = t.values[t.obs[rng.int(t.obs.length)]];
    }
    targets.forEach((_, j) => chainMean[j].push([]));
    for (let it = 0; it < opt.maxit; it++) {
      targets.forEach((t, j) => {
        const ti = vars.indexOf(t);
        const design = imputationDesign(vars, state, ti);
        const s = state[ti];
        if (t.method === 'pmm') {
          const r = pmmImpute(design, s, t.obs, t.mis, rng, opt.donors);
          t.mis.forEach((i, r2) => (s[i] = r.values[r2]));
          aliased[j] = Math.max(aliased[j], r.aliased);
        } else if (t.col.kind === 'numeric') {
          const d = drawLogistic(design, s, t.obs, rng);
          if (!d.converged) notConverged[j]++;
          for (const i of t.mis) s[i] = rng.next() < sigmoid(rowDot(design, i, d.beta)) ? 1 : 0;
        } else {
          const r = imputeCategorical(design, Int32Array.from(s), t.levels, t.obs, t.mis, rng);
          notConverged[j] += r.notConverged;
          t.mis.forEach((i, r2) => (s[i] = r.codes[r2]));
        }
        let sum = 0;
        for (const i of t.mis) sum += s[i];
        chainMean[j][k].push(sum / t.mis.length);
      });
      done++;
      hooks.onProgress?.(done, total);
      if (hooks.tick) await hooks.tick();
      if (hooks.signal?.aborted) throw new FulcraError('cancelled', 'Imputation was cancelled.');
    }
    targets.forEach((t, j) => draws[j].push(Float64Array.from(t.mis, (i) => state[vars.indexOf(t)][i])));
  }
  targets.forEach((t, j) => {
    if (notConverged[j] > 0)
      warnings.push(
        warning(
          'mi-imputation-not-converged',
          `The logistic imputation model for "${t.col.name}" did not converge in ${notConverged[j]} fits.`,
          'Check for a predictor that almost perfectly predicts this column; the imputations still use a ' +
            'stabilised fit.',
          [t.col.name],
        ),
      );
    if (aliased[j] > 0)
      warnings.push(
        warning(
          'mi-collinear-predictors',
          `In the imputation model for "${t.col.name}", ${aliased[j]} predictor column(s) were linear ` +
            `combinations of others and were left out.`,
          'Look for duplicated or derived columns among the model and auxiliary columns.',
          [t.col.name],
        ),
      );
  });
  const imputed: ImputedColumn[] = targets.map((t, j) => ({
    column: t.col.name,
    method: t.method,
    rows: t.mis,
    draws: draws[j],
    chainMean: chainMean[j],
  }));
  return {
    m: opt.m,
    maxit: opt.maxit,
    seed: opt.seed,
    donors: opt.donors,
    columns: vars.map((v) => v.col.name),
    imputed,
    warnings,
  };
}

function prepare(col: Column, n: number): Var {
  const values = col.kind === 'numeric' ? Float64Array.from(col.values) : Float64Array.from(col.codes);
  const obs: number[] = [],
    mis: number[] = [];
  for (let i = 0; i < n; i++) (isMissing(col, i) ? mis : obs).push(i);
  let mean = 0,
    sd = 0,
    binary = true;
  if (col.kind === 'numeric') {
    for (const i of obs) {
      mean += values[i];
      if (values[i] !== 0 && values[i] !== 1) binary = false;
    }
    mean /= obs.length || 1;
    for (const i of obs) sd += (values[i] - mean) ** 2;
    sd = obs.length > 1 ? Math.sqrt(sd / (obs.length - 1)) : 0;
  }
  const levels = col.kind === 'categorical' ? col.levels.length : 2;
  const method: ImputationMethod =
    col.kind === 'numeric' ? (binary ? 'logistic' : 'pmm') : levels > 2 ? 'multinomial' : 'logistic';
  return { col, values, obs: Int32Array.from(obs), mis: Int32Array.from(mis), method, levels, mean, sd };
}

/**
 * The predictors of one imputation model, from the current state of the chain: intercept, standardised numeric
 * columns and level indicators (first level as reference) of every variable but `target`.
 */
function imputationDesign(vars: Var[], state: Float64Array[], target: number): ImputationDesign {
  const n = state[0].length;
  let q = 1;
  vars.forEach((v, j) => {
    if (j !== target) q += v.col.kind === 'numeric' ? (v.sd > 0 ? 1 : 0) : v.levels - 1;
  });
  const X = new Float64Array(n * q);
  X.fill(1, 0, n);
  let off = n;
  vars.forEach((v, j) => {
    if (j === target) return;
    const s = state[j];
    if (v.col.kind === 'numeric') {
      if (!(v.sd > 0)) return;
      for (let i = 0; i < n; i++) X[off + i] = (s[i] - v.mean) / v.sd;
      off += n;
    } else {
      for (let i = 0; i < n; i++) if (s[i] > 0) X[off + (s[i] - 1) * n + i] = 1;
      off += (v.levels - 1) * n;
    }
  });
  return { X, n, q };
}

/** The k-th completed dataset (0-based): a copy of `data` with imputed cells filled in. */
export function completeDataset(data: Dataset, imp: MiceResult, k: number): Dataset {
  if (!Number.isInteger(k) || k < 0 || k >= imp.m)
    throw new FulcraError('bad-argument', `Imputation index must be an integer from 0 to ${imp.m - 1}; got ${k}.`);
  const byName = new Map(imp.imputed.map((c) => [c.column, c]));
  return {
    nRows: data.nRows,
    ...rowNumbering(data),
    columns: data.columns.map((col) => {
      const ic = byName.get(col.name);
      if (!ic) return col;
      const d = ic.draws[k];
      if (col.kind === 'numeric') {
        const values = Float64Array.from(col.values);
        ic.rows.forEach((i, r) => (values[i] = d[r]));
        return { ...col, values };
      }
      const codes = Int32Array.from(col.codes);
      ic.rows.forEach((i, r) => (codes[i] = d[r]));
      return { ...col, codes };
    }),
  };
}
