import type { Costs } from '../core/costs';
import { FulcraError } from '../core/data';
import { defaultFitOptions, type FitMethod, type ModelSpec } from '../core/model';

/** Internal validation of the whole procedure: bootstrap optimism, or repeated stratified k-fold CV. */
export type InternalValidationRequest =
  | { method: 'bootstrap'; replicates: number; seed: number }
  | { method: 'repeated-cv'; folds: number; repeats: number; seed: number };

/** How λ of a penalised fit is set: by cross-validation (lowest error, or the one-standard-error rule), or fixed. */
export type LambdaRule = 'cv-min' | 'cv-1se';

/**
 * One analysis, as the page and `npm run fit` ask for it. Every field has a default (defaultAnalysisRequest)
 * except the model specification; analysisRequestTable states what each field accepts.
 */
export interface AnalysisRequest {
  spec: ModelSpec;
  /** 'ml', 'firth', 'ridge', 'lasso' or 'elastic-net' (one enum everywhere). */
  method: FitMethod;
  /** Confidence level of every interval. */
  level: number;
  /** Profile-likelihood intervals (ML and Firth; skipped above INFERENCE_BUDGET_S of estimated computing). */
  profile: boolean;
  /** Likelihood-ratio test of each term (ML and Firth; skipped above INFERENCE_BUDGET_S). */
  termTests: boolean;
  /** Elastic-net mixing for 'elastic-net' (lasso is always 1, ridge 0). */
  alpha: number;
  /** λ of ridge, lasso and elastic net: chosen by cross-validation, or a fixed value on the standardised scale. */
  lambda: LambdaRule | number;
  /** Folds of the cross-validation that chooses λ. */
  folds: number;
  /** The costs of a missed case and a false alarm, for the cost-based cut-offs of the evaluation; null: none. */
  costs: Costs | null;
  /** Cut-off for the confusion matrix of the evaluation; null: the cost-based one when costs are given. */
  threshold: number | null;
  /** Points kept on the ROC and precision–recall curves. */
  rocPoints: number;
  /** Internal validation to run with the fit, or null (the page runs it later, on request). */
  validation: InternalValidationRequest | null;
  /** Seeds the cross-validation folds of λ selection. */
  seed: number;
  /** Iteration limit of every maximum-likelihood, Firth and ridge fit (penalised fits take at least 100). */
  maxIter: number;
  /**
   * Spreadsheet row numbers left out of this analysis ("what if these rows were left out?"); the data themselves
   * are not changed. Recorded with the request, so the model file and the PDF say which rows were left out.
   */
  leaveOut: number[];
}

/** What callers pass: the specification and any fields that differ from the defaults. */
export type AnalysisRequestInput = Partial<Omit<AnalysisRequest, 'spec'>> & { spec: ModelSpec };

export const defaultAnalysisRequest: Omit<AnalysisRequest, 'spec'> = {
  method: 'ml',
  level: 0.95,
  profile: true,
  termTests: true,
  alpha: 0.5,
  lambda: 'cv-1se',
  folds: 10,
  costs: null,
  threshold: null,
  rocPoints: 400,
  validation: null,
  seed: 1,
  maxIter: defaultFitOptions.maxIter,
  leaveOut: [],
};

const METHODS: readonly FitMethod[] = ['ml', 'firth', 'ridge', 'lasso', 'elastic-net'];
const isInt = (v: unknown, lo: number, hi: number) => Number.isInteger(v) && (v as number) >= lo && (v as number) <= hi;
const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null;
const positive = (v: unknown) => typeof v === 'number' && Number.isFinite(v) && v > 0;

function validValidation(v: unknown): boolean {
  if (v === null) return true;
  if (!isObject(v) || !Number.isFinite(v.seed)) return false;
  if (v.method === 'bootstrap') return isInt(v.replicates, 1, 100_000);
  return v.method === 'repeated-cv' && isInt(v.folds, 2, 1000) && isInt(v.repeats, 1, 1000);
}

/** Declared constraints of every request field: one table, checked before any work is done. */
export const analysisRequestTable: {
  [K in keyof AnalysisRequest]: { valid: (v: unknown) => boolean; expected: string };
} = {
  spec: {
    valid: (v) => isObject(v) && typeof v.outcome === 'string' && Array.isArray(v.terms),
    expected: 'a model specification {outcome, event?, terms[]}',
  },
  method: { valid: (v) => METHODS.includes(v as FitMethod), expected: METHODS.map((m) => `'${m}'`).join(', ') },
  level: { valid: (v) => typeof v === 'number' && v > 0 && v < 1, expected: 'a number between 0 and 1 (e.g. 0.95)' },
  profile: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
  termTests: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
  alpha: { valid: (v) => typeof v === 'number' && v >= 0 && v <= 1, expected: 'a number from 0 (ridge) to 1 (lasso)' },
  lambda: {
    valid: (v) => v === 'cv-min' || v === 'cv-1se' || (typeof v === 'number' && Number.isFinite(v) && v >= 0),
    expected: "'cv-min', 'cv-1se' or a number ≥ 0",
  },
  folds: { valid: (v) => isInt(v, 2, 1000), expected: 'a whole number from 2 to 1000' },
  costs: {
    valid: (v) => v === null || (isObject(v) && positive(v.missedCase) && positive(v.falseAlarm)),
    expected: 'null or {missedCase, falseAlarm}, two numbers > 0',
  },
  threshold: {
    valid: (v) => v === null || (typeof v === 'number' && v > 0 && v < 1),
    expected: 'null or a number between 0 and 1',
  },
  rocPoints: { valid: (v) => isInt(v, 2, 1_000_000), expected: 'a whole number from 2 to 1000000' },
  validation: {
    valid: validValidation,
    expected:
      "null, {method: 'bootstrap', replicates, seed} or {method: 'repeated-cv', folds (≥ 2), repeats (≥ 1), seed}",
  },
  seed: { valid: (v) => typeof v === 'number' && Number.isFinite(v), expected: 'a finite number' },
  maxIter: { valid: (v) => isInt(v, 1, 10_000), expected: 'a whole number from 1 to 10000' },
  leaveOut: {
    valid: (v) =>
      Array.isArray(v) &&
      v.every((r) => isInt(r, 1, 2 ** 31 - 1)) &&
      new Set(v).size === v.length &&
      v.length <= 10_000,
    expected: 'a list of distinct spreadsheet row numbers (whole numbers ≥ 1), at most 10000',
  },
};

/**
 * Fills the defaults and checks every field against analysisRequestTable; throws FulcraError 'bad-request'
 * naming the field and the value. A fixed λ of 0 is refused for ridge (that is maximum likelihood).
 */
export function resolveRequest(input: AnalysisRequestInput): AnalysisRequest {
  for (const key of Object.keys(input)) {
    if (!(key in analysisRequestTable)) {
      throw new FulcraError(
        'bad-request',
        `Unknown analysis option "${key}". Known options: ${Object.keys(analysisRequestTable).join(', ')}.`,
      );
    }
  }
  const defined = Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined));
  const r = { ...defaultAnalysisRequest, ...defined } as AnalysisRequest;
  for (const key of Object.keys(analysisRequestTable) as (keyof AnalysisRequest)[]) {
    if (!analysisRequestTable[key].valid(r[key])) {
      throw new FulcraError(
        'bad-request',
        `Analysis option ${key} = ${JSON.stringify(r[key])} is not valid; ` +
          `expected ${analysisRequestTable[key].expected}.`,
      );
    }
  }
  if (r.method === 'ridge' && r.lambda === 0) {
    throw new FulcraError(
      'bad-request',
      'Ridge needs lambda > 0 or a cross-validation rule, got 0.',
      'Set lambda, or use method "ml" for an unpenalised fit.',
    );
  }
  return r;
}

/** Elastic-net mixing of a penalised method: lasso 1, ridge 0, elastic net the request's α; null otherwise. */
export function alphaOf(r: Pick<AnalysisRequest, 'method' | 'alpha'>): number | null {
  if (r.method === 'lasso') return 1;
  if (r.method === 'ridge') return 0;
  return r.method === 'elastic-net' ? r.alpha : null;
}
