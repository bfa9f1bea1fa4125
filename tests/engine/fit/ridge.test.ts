import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import type { ModelSpec } from '../../../src/engine/core/model';
import { maxRelErr, readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/ridge-birthwt.json from ridge-birthwt.R — glmnet 4.1.6 (alpha = 0,
// standardize = TRUE, thresh = 1e-20) on MASS::birthwt, and an exact Newton solution of the same objective in base R.
const ref = readJson('tests/fixtures/reference/ridge-birthwt.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const spec: ModelSpec = {
  outcome: 'low',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
    c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
  ),
};

describe('ridge at a fixed lambda on MASS::birthwt', () => {
  (ref.lambda as number[]).forEach((lambda, k) => {
    it(`matches glmnet(alpha = 0) and the exact R solution at λ = ${lambda} to 1e-5`, () => {
      const r = fit(data, spec, { method: 'ridge', lambda });
      const est = r.coefficients.map((c) => c.estimate);
      expect(maxRelErr(est, ref.glmnet[k])).toBeLessThan(1e-5);
      expect(maxRelErr(est, ref.exact[k])).toBeLessThan(1e-8);
    });
  });

  it('gives no inference table and says why (penalised-no-inference)', () => {
    const r = fit(data, spec, { method: 'ridge', lambda: 0.05 });
    expect(
      r.coefficients.every((c) => c.se === null && c.p === null && c.waldLower === null && c.profileLower === null),
    ).toBe(true);
    expect(r.covariance).toBeNull();
    expect(r.terms.every((t) => t.lrChi2 === null)).toBe(true);
    expect(r.warnings.map((w) => w.code)).toContain('penalised-no-inference');
    expect(r.lambda).toBe(0.05);
  });

  it('shrinks towards the ML estimates as λ → 0', () => {
    const ml = fit(data, spec, { profile: false }).coefficients.map((c) => c.estimate);
    const tiny = fit(data, spec, { method: 'ridge', lambda: 1e-9 }).coefficients.map((c) => c.estimate);
    expect(maxRelErr(tiny, ml)).toBeLessThan(1e-4);
  });
});
