import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import type { ModelSpec } from '../../../src/engine/core/model';
import { maxAbsErr, maxRelErr, readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/fit-birthwt.json from fit-birthwt.R — R 4.2.2 stats::glm(binomial) on
// MASS::birthwt (Hosmer & Lemeshow 1989); profile limits are exact uniroot(tol 1e-13) roots of the profile deviance.
const ref = readJson('tests/fixtures/reference/fit-birthwt.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const spec: ModelSpec = {
  outcome: 'low',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
    c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
  ),
};
const r = fit(data, spec);
const col = <K extends keyof (typeof r.coefficients)[number]>(k: K) => r.coefficients.map((c) => c[k] as number);

describe('fit (maximum likelihood) on MASS::birthwt', () => {
  it('names the columns as the design: intercept first, race as indicators against level 1', () => {
    expect(r.coefficients.map((c) => c.name)).toEqual([
      '(Intercept)',
      'age',
      'lwt',
      'race=2',
      'race=3',
      'smoke',
      'ptl',
      'ht',
      'ui',
    ]);
    expect(r.terms.find((t) => t.name === 'race')!.columns).toEqual([3, 4]);
  });

  it('matches glm() coefficients to 1e-6 relative and SEs to 1e-5 (R 4.2.2 stats::glm)', () => {
    expect(r.converged).toBe(true);
    expect(maxRelErr(col('estimate'), ref.coef)).toBeLessThan(1e-6);
    expect(maxRelErr(col('se'), ref.se)).toBeLessThan(1e-5);
    expect(maxRelErr(col('z'), ref.z)).toBeLessThan(1e-5);
    expect(maxRelErr(col('p'), ref.p)).toBeLessThan(1e-5);
    expect(maxRelErr(r.covariance!, ref.vcov)).toBeLessThan(1e-5);
  });

  it('matches glm() Wald CIs to 1e-6·SE (R 4.2.2, estimate ± qnorm(0.975)·SE)', () => {
    const se = ref.se as number[];
    expect(maxAbsErr(col('waldLower'), ref.wald_lower)).toBeLessThan(1e-6 * Math.min(...se));
    expect(maxAbsErr(col('waldUpper'), ref.wald_upper)).toBeLessThan(1e-6 * Math.min(...se));
  });

  it('matches exact profile-likelihood limits (uniroot on the profile deviance in R) to 1e-5 relative', () => {
    expect(maxRelErr(col('profileLower'), ref.profile_lower)).toBeLessThan(1e-5);
    expect(maxRelErr(col('profileUpper'), ref.profile_upper)).toBeLessThan(1e-5);
  });

  it('gives odds ratios as exp(estimate)', () => {
    r.coefficients.forEach((c) => expect(c.oddsRatio).toBeCloseTo(Math.exp(c.estimate), 12));
  });

  it('matches deviance, null deviance, logLik, AIC and BIC (R 4.2.2 glm, AIC(), BIC())', () => {
    expect(r.deviance).toBeCloseTo(ref.deviance, 7);
    expect(r.nullDeviance).toBeCloseTo(ref.null_deviance, 7);
    expect(r.logLik).toBeCloseTo(ref.logLik, 7);
    expect(r.aic).toBeCloseTo(ref.aic, 7);
    expect(r.bic).toBeCloseTo(ref.bic, 7);
    expect(r.modelLrChi2).toBeCloseTo(ref.null_deviance - ref.deviance, 7);
    expect(r.modelDf).toBe(8);
  });

  it('matches the per-term likelihood-ratio tests of drop1(test = "LRT") including 2 df for race', () => {
    expect(r.terms.map((t) => t.name)).toEqual(ref.term_lr.terms);
    expect(r.terms.map((t) => t.df)).toEqual(ref.term_lr.df);
    expect(
      maxRelErr(
        r.terms.map((t) => t.lrChi2!),
        ref.term_lr.chi2,
      ),
    ).toBeLessThan(1e-6);
    expect(
      maxRelErr(
        r.terms.map((t) => t.lrP!),
        ref.term_lr.p,
      ),
    ).toBeLessThan(1e-6);
  });

  it('counts rows, events and events per parameter', () => {
    expect(r.nUsed).toBe(189);
    expect(r.nDropped).toBe(0);
    expect(r.events).toBe(59);
    expect(r.nonEvents).toBe(130);
    expect(r.parameters).toBe(8);
    expect(r.eventsPerParameter).toBeCloseTo(59 / 8, 12);
    expect(r.warnings.map((w) => w.code)).toEqual(['low-events-per-parameter']);
  });

  it('uses the most frequent level as the default reference', () => {
    const r2 = fit(data, { outcome: 'low', terms: [{ type: 'main', column: 'race' }] }, { profile: false });
    // race: level 1 has 96 rows, 2 has 26, 3 has 67 (MASS::birthwt)
    expect(r2.coefficients.map((c) => c.name)).toEqual(['(Intercept)', 'race=2', 'race=3']);
    expect(r2.recipe.terms[0]).toMatchObject({ type: 'categorical', reference: '1' });
  });
});
