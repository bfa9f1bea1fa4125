import { describe, expect, it } from 'vitest';
import { fitImputed } from '../../../src/engine/imputation/fitImputed';
import { fit } from '../../../src/engine/fitting/fit';
import { mice } from '../../../src/engine/imputation/mice';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { createRng } from '../../../src/engine/numerics/rng';
import { birthwtIncomplete, loadPoolFixture } from './helpers';

const truth = { '(Intercept)': -1, x1: 0.8, 'x2=yes': 0.7, x3: -0.5 } as Record<string, number>;
const spec: ModelSpec = {
  outcome: 'y',
  event: '1',
  terms: [
    { type: 'main', column: 'x1' },
    { type: 'main', column: 'x2', reference: 'no' },
    { type: 'main', column: 'x3' },
  ],
};

/** n rows from logit P(y=1) = −1 + 0.8·x1 + 0.7·[x2 = yes] − 0.5·x3, corr(x1, x3) = 0.5; then values removed. */
function simulate(seed: number, n: number, mechanism: 'mcar' | 'mar'): Dataset {
  const rng = createRng(seed);
  const x1 = new Float64Array(n),
    x3 = new Float64Array(n),
    y = new Float64Array(n);
  const x2 = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    x1[i] = rng.normal();
    x3[i] = 0.5 * x1[i] + Math.sqrt(0.75) * rng.normal();
    x2[i] = rng.next() < 0.4 ? 1 : 0;
    y[i] = rng.next() < 1 / (1 + Math.exp(-(-1 + 0.8 * x1[i] + 0.7 * x2[i] - 0.5 * x3[i]))) ? 1 : 0;
  }
  const expit = (e: number) => 1 / (1 + Math.exp(-e));
  for (let i = 0; i < n; i++) {
    // MAR: missingness of x1 depends on the outcome and x3, of x2 on the outcome; x3 stays complete.
    const p1 = mechanism === 'mcar' ? 0.25 : expit(-2 + 1.5 * y[i] + 0.8 * x3[i]);
    const p2 = mechanism === 'mcar' ? 0.15 : expit(-2.5 + 1.2 * y[i]);
    const p3 = mechanism === 'mcar' ? 0.1 : 0;
    if (rng.next() < p1) x1[i] = NaN;
    if (rng.next() < p2) x2[i] = -1;
    if (rng.next() < p3) x3[i] = NaN;
  }
  return {
    nRows: n,
    columns: [
      { kind: 'numeric', name: 'y', values: y },
      { kind: 'numeric', name: 'x1', values: x1 },
      { kind: 'categorical', name: 'x2', codes: x2, levels: ['no', 'yes'] },
      { kind: 'numeric', name: 'x3', values: x3 },
    ],
  };
}

describe('fitImputed', () => {
  for (const [mechanism, seed] of [
    ['mcar', 20261],
    ['mar', 20262],
  ] as const) {
    it(
      `recovers the known coefficients within their pooled 95% CIs with values removed ` +
        `${mechanism === 'mcar' ? 'completely at random' : 'at random given the outcome and x3'} (n = 4000, data ` +
        `seed ${seed}, mice seed 3)`,
      async () => {
        const data = simulate(seed, 4000, mechanism);
        const imp = await mice(data, spec, { m: 10, maxit: 10, seed: 3 });
        const r = await fitImputed(data, spec, imp);
        expect(r.coefficients.map((c) => c.name)).toEqual(Object.keys(truth));
        for (const c of r.coefficients) {
          expect(c.waldLower as number).toBeLessThan(truth[c.name]);
          expect(c.waldUpper as number).toBeGreaterThan(truth[c.name]);
          expect(c.fmi as number).toBeGreaterThan(0);
          expect(c.fmi as number).toBeLessThan(0.6);
        }
        expect(r.m).toBe(10);
        expect(r.dfcom).toBe(4000 - 4);
        expect(r.nImputedRows).toBeGreaterThan(0);
        if (mechanism === 'mar') {
          // Complete cases are selected on the outcome and x3, so their intercept and x3 coefficient are biased
          // outside their CIs.
          const cc = fit(data, spec, { profile: false });
          expect(cc.nUsed).toBeLessThan(4000);
          expect(cc.coefficients[0].waldUpper as number).toBeLessThan(truth['(Intercept)']);
          expect(cc.coefficients[3].waldUpper as number).toBeLessThan(truth.x3);
        }
      },
    );
  }

  it(
    'agrees with R mice 3.15.0 + glm + pool on the incomplete birthwt data: estimates within 0.4 SE, SEs ' +
      'within 20% (m = 20, seed 1)',
    async () => {
      // Reference: tests/fixtures/reference/mi-pool.R (poolM50: mice(d, m = 50, maxit = 10, seed = 11)); Monte Carlo
      // on both sides.
      const data = birthwtIncomplete();
      const ref = loadPoolFixture();
      const bwSpec: ModelSpec = {
        outcome: 'low',
        event: '1',
        terms: ['age', 'lwt', 'race', 'smoke'].map((column) => ({ type: 'main' as const, column })),
      };
      const r = await fitImputed(data, bwSpec, await mice(data, bwSpec, { m: 20, seed: 1 }));
      expect(r.dfcom).toBe(ref.dfcom);
      r.coefficients.forEach((c, j) => {
        expect(Math.abs(c.estimate - ref.poolM50.estimate[j]) / ref.poolM50.std_error[j]).toBeLessThan(0.4);
        expect(Math.abs((c.se as number) / ref.poolM50.std_error[j] - 1)).toBeLessThan(0.2);
      });
      const race = r.terms.find((t) => t.name === 'race');
      expect(race?.columns).toEqual([3, 4]);
      expect(race?.test?.df1).toBe(2);
      expect(race?.test?.p).toBeGreaterThan(0);
      expect(race?.test?.p).toBeLessThan(1);
    },
  );

  it('reports progress per imputed dataset, passes on imputation warnings, and honours cancellation', async () => {
    const data = simulate(5, 300, 'mcar');
    const imp = await mice(
      data,
      { ...spec, terms: [{ type: 'interaction', columns: ['x1', 'x2'] }, ...spec.terms] },
      { m: 3, maxit: 2, seed: 1 },
    );
    const seen: number[] = [];
    const r = await fitImputed(data, spec, imp, {}, { onProgress: (d) => seen.push(d) });
    expect(seen).toEqual([1, 2, 3]);
    expect(r.warnings.map((w) => w.code)).toContain('mi-nonlinear-terms');
    await expect(fitImputed(data, spec, imp, {}, { signal: { aborted: true } })).rejects.toMatchObject({
      code: 'cancelled',
    });
  });

  it('leaves the rows with an imputed outcome out of every fit when asked, after using them to impute', async () => {
    const data = simulate(8, 400, 'mcar');
    const y = data.columns[0] as { values: Float64Array };
    for (let i = 0; i < 400; i += 10) y.values[i] = NaN;
    const imp = await mice(data, spec, { m: 2, maxit: 2, seed: 1 });
    expect(imp.warnings.map((w) => w.code)).toContain('mi-outcome-imputed');
    const all = await fitImputed(data, spec, imp);
    const mid = await fitImputed(data, spec, imp, { excludeImputedOutcome: true });
    expect(all.nExcluded).toBe(0);
    expect(mid.nExcluded).toBe(40);
    expect(mid.dfcom).toBe(360 - 4);
    expect(all.dfcom).toBe(400 - 4);
    expect(mid.events + mid.nonEvents).toBe(360);
  });
});
