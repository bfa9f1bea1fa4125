import { describe, expect, it } from 'vitest';
import { FulcraError, type Dataset } from '../../src/engine/core';
import {
  defaultAnalysisRequest,
  INFERENCE_BUDGET_S,
  inferenceSeconds,
  largeDataPlan,
  pipelineOf,
  resolveRequest,
} from '../../src/engine/workflow';

const spec = { outcome: 'y', terms: [{ type: 'main' as const, column: 'x' }] };

describe('the analysis request', () => {
  it('fills every default from one object', () => {
    expect(resolveRequest({ spec })).toEqual({ spec, ...defaultAnalysisRequest });
    expect(resolveRequest({ spec, method: 'lasso', seed: undefined }).seed).toBe(1);
  });

  it.each([
    [{ method: 'elasticnet' }, /method = "elasticnet".*'elastic-net'/],
    [{ lambda: 'min' }, /lambda = "min"/],
    [{ costs: { fn: 10, fp: 1 } }, /costs = .*missedCase, falseAlarm/],
    [{ validation: { method: 'bootstrap', replicates: 0, seed: 1 } }, /validation/],
    [{ lambdaRule: '1se' }, /Unknown analysis option "lambdaRule"/],
    [{ method: 'ridge', lambda: 0 }, /Ridge needs lambda > 0/],
    [{ maxIter: 0 }, /maxIter = 0 is not valid; expected a whole number from 1 to 10000/],
    [{ maxIter: 2.5 }, /maxIter = 2\.5/],
    [{ maxIter: 10_001 }, /maxIter = 10001/],
  ])('refuses %j, naming the value', (extra, message) => {
    const bad = () => resolveRequest({ spec, ...(extra as object) });
    expect(bad).toThrow(FulcraError);
    expect(bad).toThrow(message);
  });
});

describe('the iteration limit', () => {
  it('defaults to 50 and reaches the fit options of the procedure that bootstrap and CV re-run', () => {
    const data: Dataset = { nRows: 1, columns: [] };
    expect(resolveRequest({ spec }).maxIter).toBe(50);
    for (const method of ['ml', 'firth'] as const) {
      expect(pipelineOf(data, resolveRequest({ spec, method, maxIter: 7 })).fitOptions).toMatchObject({
        method,
        maxIter: 7,
      });
    }
    const ridge = pipelineOf(data, resolveRequest({ spec, method: 'ridge', lambda: 0.1, maxIter: 300 }));
    expect(ridge.fitOptions).toMatchObject({ method: 'ridge', lambda: 0.1, maxIter: 300 });
  });
});

describe('the large-data rule (the same for the page and npm run fit)', () => {
  const data = (nRows: number): Dataset => ({
    nRows,
    columns: [
      { kind: 'numeric', name: 'x', values: new Float64Array(nRows) },
      { kind: 'numeric', name: 'y', values: new Float64Array(nRows) },
    ],
  });
  const r = resolveRequest({ spec });

  // One predictor: 2 design columns, 1 term. The largest row counts whose estimated cost fits the budget.
  const fits = (part: 'profile' | 'termTests') => {
    const perRow = inferenceSeconds(1e6, 2, 1)[part] / 1e6;
    return Math.floor(INFERENCE_BUDGET_S / perRow);
  };

  it('keeps profile intervals and term tests while each costs at most the budget', () => {
    expect(fits('profile')).toBeLessThan(fits('termTests'));
    expect(largeDataPlan(data(fits('profile')), r)).toEqual({ profile: true, termTests: true, warnings: [] });
  });

  it('drops each above the budget, with a notice', () => {
    const mid = largeDataPlan(data(fits('profile') + 10), r);
    expect([mid.profile, mid.termTests]).toEqual([false, true]);
    expect(mid.warnings.map((w) => w.code)).toEqual(['large-data-wald-only']);
    expect(mid.warnings[0].message).toContain(
      `With ${(fits('profile') + 10).toLocaleString('en')} rows, profile-likelihood intervals were not computed`,
    );
    const big = largeDataPlan(data(fits('termTests') + 10), { ...r, profile: false });
    expect([big.profile, big.termTests]).toEqual([false, false]);
    expect(big.warnings.map((w) => w.code)).toEqual(['large-data-no-term-tests']);
  });

  it('keeps both at 10⁵ × 50 and at 10⁶ × 20 (the speed targets) and skips profile limits at 10⁶ × 50', () => {
    const at = (n: number, p: number) => inferenceSeconds(n, p, p - 1);
    expect(at(1e5, 51).profile).toBeLessThanOrEqual(INFERENCE_BUDGET_S);
    expect(at(1e5, 51).termTests).toBeLessThanOrEqual(INFERENCE_BUDGET_S);
    // measured 2026-12-05 on one thread of the development machine: 3.0 s and 3.5 s
    expect(at(1e6, 21).profile).toBeLessThanOrEqual(INFERENCE_BUDGET_S);
    expect(at(1e6, 21).termTests).toBeLessThanOrEqual(INFERENCE_BUDGET_S);
    expect(at(1e6, 51).profile).toBeGreaterThan(INFERENCE_BUDGET_S);
    // Firth's passes also take X'WX and the hat values: far dearer at the same size.
    expect(inferenceSeconds(1e5, 51, 50, true).profile).toBeGreaterThan(10 * at(1e5, 51).profile);
  });
});
