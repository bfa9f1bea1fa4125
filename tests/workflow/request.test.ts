import { describe, expect, it } from 'vitest';
import { FulcraError, type Dataset } from '../../src/engine/core';
import {
  defaultAnalysisRequest,
  largeDataPlan,
  pipelineOf,
  PROFILE_MAX_CELLS,
  resolveRequest,
  TERM_TESTS_MAX_CELLS,
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

  it('keeps profile intervals up to 3·10⁶ design cells and term tests up to 5·10⁶', () => {
    expect(largeDataPlan(data(PROFILE_MAX_CELLS / 2), r)).toEqual({ profile: true, termTests: true, warnings: [] });
  });

  it('drops profile intervals above 3·10⁶ cells and term tests above 5·10⁶, each with a notice', () => {
    const mid = largeDataPlan(data(PROFILE_MAX_CELLS / 2 + 1), r);
    expect([mid.profile, mid.termTests]).toEqual([false, true]);
    expect(mid.warnings.map((w) => w.code)).toEqual(['large-data-wald-only']);
    expect(mid.warnings[0].message).toContain('With 1,500,001 rows, profile-likelihood intervals were not computed');
    const big = largeDataPlan(data(TERM_TESTS_MAX_CELLS / 2 + 1), { ...r, profile: false });
    expect([big.profile, big.termTests]).toEqual([false, false]);
    expect(big.warnings.map((w) => w.code)).toEqual(['large-data-no-term-tests']);
  });
});
