import { oddsRatio } from '../engine/fitting';
import { FulcraError, type Dataset } from '../engine/core';
import { linearPredictorFromRecipe } from '../engine/design';
import { fit } from '../engine/fitting';
import type { FitResult } from '../engine/core';
import { fitPipeline, type Pipeline } from '../engine/validation';
import { coxSnellR2, riley2020SampleSize, type SampleSizeResult } from '../engine/evaluation';
import { prepareThresholds } from '../engine/evaluation';
import { warning, type EngineWarning } from '../engine/core';
import { sigmoid } from '../engine/numerics';
import { checkFitBudget } from './budget';
import { designColumnCount } from '../engine/fitting';
import { performanceView } from './performance';
import type { FitRequest, FitView, OddsRow } from './protocol';
import { requireData, tick, type Session } from './session';
import { CHUNK_ROWS, rowPoolThreads } from '../engine/numerics';
import { select } from '../io/numericSummary';

const PROFILE_MAX_CELLS = 1e6;
const TERM_TESTS_MAX_CELLS = 5e6;

type Hooks = { onProgress?: (d: number, t: number) => void; signal?: { aborted: boolean } };

/** The pipeline record (data + spec + options + penalty) that fitting and bootstrap validation both run. */
export function toPipeline(data: Dataset, req: FitRequest): Pipeline {
  const penalised = req.method === 'ridge' || req.method === 'lasso' || req.method === 'elasticnet';
  return {
    data,
    spec: req.spec,
    fitOptions: { method: req.method === 'firth' ? 'firth' : 'ml', level: req.level, profile: req.profile },
    penalty: penalised
      ? {
          alpha: req.method === 'ridge' ? 0 : req.method === 'lasso' ? 1 : req.alpha,
          lambda: req.lambdaRule === 'min' ? 'cv-min' : 'cv-1se',
          folds: 10,
          criterion: 'deviance',
          nLambda: 100,
        }
      : null,
    seed: 1,
  };
}

/** Fits the requested model, then computes its apparent performance and prepares the cut-off queries. */
export async function fitModel(s: Session, req: FitRequest, hooks: Hooks): Promise<FitView> {
  const data = requireData(s);
  // Profile intervals cost ~2×4 constrained refits per coefficient and term tests one refit per term: at
  // 10⁵ × 21 about +14 s and +3 s CPU, at 10⁶ × 21 +17 s for term tests alone (measured). Above these sizes they
  // are skipped and a notice says so; Wald intervals agree closely with profile ones at such sample sizes.
  const size = data.nRows * designColumnCount(data, req.spec);
  const profile = req.profile && size <= PROFILE_MAX_CELLS;
  const termTests = size <= TERM_TESTS_MAX_CELLS;
  checkFitBudget(data, req.spec);
  let result: FitResult;
  let lambda: FitView['lambda'] = null;
  const extra: EngineWarning[] = [];
  if (!profile && req.profile) {
    extra.push(
      warning(
        'large-data-wald-only',
        `With ${data.nRows.toLocaleString('en')} rows, profile-likelihood intervals were not computed (they would take minutes); the Wald intervals shown agree closely with them at this sample size.`,
        'Fit a random sample of rows if you need profile-likelihood intervals.',
      ),
    );
  }
  if (!termTests) {
    extra.push(
      warning(
        'large-data-no-term-tests',
        `With ${data.nRows.toLocaleString('en')} rows, the likelihood-ratio test of each term was not computed (one refit per term).`,
        'Use the Wald p-values, or fit a random sample of rows for the term tests.',
      ),
    );
  }
  if (req.method === 'ml' || req.method === 'firth') {
    result = fit(data, req.spec, { method: req.method, level: req.level, profile, termTests });
  } else {
    const pipeline = toPipeline(data, req);
    const pf = await fitPipeline(pipeline, { ...hooks, tick });
    const cv = pf.cv!;
    lambda = {
      alpha: pf.alpha ?? 0,
      lambdaMin: cv.path[cv.indexMin].lambda,
      lambda1se: cv.path[cv.index1se].lambda,
      chosen: pf.lambda,
      rule: req.lambdaRule,
      path: cv.path.map((r) => ({ lambda: r.lambda, cvError: r.error, cvSe: r.se, nonzero: r.nonzero })),
    };
    extra.push(...pf.warnings);
    if (req.method === 'ridge') {
      result = fit(data, req.spec, {
        method: 'ridge',
        lambda: pf.lambda,
        level: req.level,
        profile: false,
        termTests: false,
      });
    } else {
      const base = fit(data, req.spec, { method: 'ml', level: req.level, profile: false, termTests: false });
      result = penalisedRecord(
        base,
        pf.coefficients.map((c) => c.estimate),
        data,
        pf.lambda,
        pf.alpha ?? 1,
      );
      extra.push(
        warning(
          'penalised-no-inference',
          'Penalised estimates are shrunk towards zero on purpose, so no valid confidence intervals or p-values exist for them.',
          'Use bootstrap validation to judge the model; use the standard or Firth fit if you need intervals.',
        ),
      );
    }
  }
  // η of the rows used without a second n×p design (the fit's own design is standardised and gone).
  const d = linearPredictorFromRecipe(
    result.recipe,
    result.coefficients.map((c) => c.estimate),
    data,
  );
  if (!d.y) throw new FulcraError('no-outcome', `The outcome column "${result.recipe.outcome}" is missing.`);
  const eta = d.eta;
  const risk = eta.map(sigmoid);
  const { view: performance, record } = performanceView(d.y, risk, eta, req.level);
  s.fit = result;
  s.request = req;
  s.y = d.y;
  s.risk = risk;
  s.prepared = record.prepared ?? prepareThresholds(d.y, risk);
  s.evaluation = { ...record, prepared: null };
  s.validation = null;
  s.imputed = null;
  const sampleSize = sampleSizeCheck(result);
  s.sampleSize = sampleSize.record;
  const warnings = dedupe([...result.warnings, ...extra, ...performance.warnings]);
  return {
    request: req,
    fit: result,
    rows: oddsRows(s, result),
    lambda,
    performance,
    sampleSize: sampleSize.view,
    typical: typicalValues(data, result, d.rowsUsed),
    rowsUsed: d.n,
    threads: d.n > CHUNK_ROWS ? rowPoolThreads() : 1,
    warnings,
  };
}

function dedupe(ws: EngineWarning[]): EngineWarning[] {
  return ws.filter((w, i) => ws.findIndex((u) => u.code === w.code && u.message === w.message) === i);
}

/** A penalised (lasso / elastic-net) fit in the FitResult shape: no inference, deviance at the penalised estimate. */
function penalisedRecord(base: FitResult, beta: number[], data: Dataset, lambda: number, alpha: number): FitResult {
  const d = linearPredictorFromRecipe(base.recipe, beta, data);
  const risk = d.eta.map(sigmoid);
  let ll = 0;
  for (let i = 0; i < d.n; i++)
    ll += d.y![i] === 1 ? Math.log(Math.max(risk[i], 1e-300)) : Math.log(Math.max(1 - risk[i], 1e-300));
  const nonzero = beta.slice(1).filter((b) => b !== 0).length;
  return {
    ...base,
    method: alpha === 1 ? 'lasso' : alpha === 0 ? 'ridge' : 'elastic-net',
    alpha,
    lambda,
    coefficients: base.coefficients.map((c, j) => ({
      ...c,
      estimate: beta[j],
      oddsRatio: oddsRatio(beta[j]),
      se: null,
      z: null,
      p: null,
      waldLower: null,
      waldUpper: null,
      profileLower: null,
      profileUpper: null,
    })),
    terms: base.terms.map((t) => ({ ...t, lrChi2: null, lrP: null })),
    deviance: -2 * ll,
    logLik: ll,
    aic: null,
    bic: null,
    modelLrChi2: null,
    modelDf: nonzero,
    modelLrP: null,
    covariance: null,
    warnings: base.warnings.filter((w) => w.code !== 'complete-separation' && w.code !== 'quasi-separation'),
  };
}

function oddsRows(s: Session, f: FitResult): OddsRow[] {
  const truth = s.summary?.truth ?? null;
  const truthOf = (name: string): number | null => {
    if (!truth) return null;
    if (name === '(Intercept)') return truth.find((t) => t.column === null)?.value ?? null;
    const hit = truth.find(
      (t) => t.column !== null && (t.level === undefined ? name === t.column : name === `${t.column}=${t.level}`),
    );
    return hit ? hit.value : null;
  };
  return f.coefficients.map((c) => ({
    name: c.name,
    term: c.term,
    estimate: c.estimate,
    oddsRatio: c.oddsRatio,
    se: c.se,
    p: c.p,
    waldLower: c.waldLower,
    waldUpper: c.waldUpper,
    profileLower: c.profileLower,
    profileUpper: c.profileUpper,
    aliased: c.aliased,
    truth: truthOf(c.name),
  }));
}

function sampleSizeCheck(f: FitResult): { view: FitView['sampleSize']; record: SampleSizeResult | null } {
  try {
    const phi = f.events / f.nUsed;
    let r2: number | undefined;
    try {
      r2 = coxSnellR2(f.deviance, f.nullDeviance, f.nUsed);
    } catch {
      r2 = undefined;
    }
    const input = {
      parameters: Math.max(1, f.parameters),
      outcomeProportion: phi,
      actual: { n: f.nUsed, events: f.events },
    };
    let res;
    try {
      res = riley2020SampleSize({ ...input, r2cs: r2 !== undefined && r2 > 0 ? r2 : undefined });
    } catch {
      res = riley2020SampleSize(input);
    }
    return { view: { lines: res.summary, warnings: res.warnings }, record: res };
  } catch (e) {
    return {
      view: { lines: [`The sample-size check could not be computed: ${(e as Error).message}`], warnings: [] },
      record: null,
    };
  }
}

/** Median of each numeric predictor and the reference level of each categorical one, over the rows used. */
function typicalValues(data: Dataset, f: FitResult, rows: Int32Array): Record<string, string | number> {
  const out: Record<string, string | number> = {};
  let v = new Float64Array(0); // one scratch buffer for every column
  for (const t of f.recipe.terms) {
    if (t.type === 'interaction') continue;
    if (t.type === 'categorical') {
      out[t.column] = t.reference;
      continue;
    }
    const col = data.columns.find((c) => c.name === t.column);
    if (!col || col.kind !== 'numeric') continue;
    // The lower median (an observed value) by selection: O(n), where sorting 10⁶ values takes ~0.4 s.
    if (v.length < rows.length) v = new Float64Array(rows.length);
    for (let i = 0; i < rows.length; i++) v[i] = col.values[rows[i]];
    out[t.column] = rows.length ? select(v.subarray(0, rows.length), Math.floor((rows.length - 1) / 2)) : NaN;
  }
  return out;
}
