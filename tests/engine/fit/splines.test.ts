import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import { rcsBasis, rcsKnots } from '../../../src/engine/design/splines';
import type { ModelSpec } from '../../../src/engine/core/model';
import { maxRelErr, readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/fit-splines.json from fit-splines.R — R 4.2.2 quantile(type = 7) knots at
// Harrell's quantiles (RMS 2nd ed. Table 2.3), Harrell's rcspline.eval formula written out in base R,
// glm.fit(binomial).
const ref = readJson('tests/fixtures/reference/fit-splines.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const num = (c: string) => (data.columns.find((d) => d.name === c) as { values: Float64Array }).values;

describe('restricted cubic splines and interactions', () => {
  it("places knots at Harrell's quantiles like R quantile(type = 7)", () => {
    expect(rcsKnots(num('age'), 4, 'age')).toEqual(ref.age_knots);
    expect(maxRelErr(rcsKnots(num('lwt'), 5, 'lwt'), ref.lwt_knots)).toBeLessThan(1e-14);
  });

  it('evaluates the basis like the R formula', () => {
    const got: number[] = [];
    for (let i = 0; i < 5; i++) got.push(num('age')[i], ...rcsBasis(num('age')[i], ref.age_knots));
    expect(
      maxRelErr(
        got.filter((_, k) => ref.age_basis_first5[k] !== 0),
        ref.age_basis_first5.filter((v: number) => v !== 0),
      ),
    ).toBeLessThan(1e-12);
  });

  it('is linear beyond the outer knots (the restriction)', () => {
    const t = [1, 2, 4, 7];
    const f = (x: number) => rcsBasis(x, t)[0];
    expect(f(10) - 2 * f(9) + f(8)).toBeCloseTo(0, 9);
    expect(f(0.5)).toBe(0);
  });

  it('fits splines, a categorical term and a categorical × numeric interaction like glm.fit', () => {
    const spec: ModelSpec = {
      outcome: 'low',
      terms: [
        { type: 'spline', column: 'age', knots: 4 },
        { type: 'spline', column: 'lwt', knots: 5 },
        { type: 'main', column: 'race', reference: '1' },
        { type: 'main', column: 'smoke' },
        { type: 'main', column: 'ht' },
        { type: 'interaction', columns: ['race', 'smoke'] },
      ],
    };
    const r = fit(data, spec, { profile: false });
    expect(r.coefficients.map((c) => c.name)).toEqual([
      '(Intercept)',
      'age',
      "age'",
      "age''",
      'lwt',
      "lwt'",
      "lwt''",
      "lwt'''",
      'race=2',
      'race=3',
      'smoke',
      'ht',
      'race=2:smoke',
      'race=3:smoke',
    ]);
    expect(
      maxRelErr(
        r.coefficients.map((c) => c.estimate),
        ref.coef,
      ),
    ).toBeLessThan(1e-6);
    expect(
      maxRelErr(
        r.coefficients.map((c) => c.se!),
        ref.se,
      ),
    ).toBeLessThan(1e-5);
    expect(r.deviance).toBeCloseTo(ref.deviance, 7);
    expect(r.terms.map((t) => t.df)).toEqual([3, 4, 2, 1, 1, 2]);
    expect(r.recipe.terms[0]).toMatchObject({ type: 'spline', knots: ref.age_knots });
  });

  it('refuses a spline on a column with too few distinct values, naming it', () => {
    expect(() => fit(data, { outcome: 'low', terms: [{ type: 'spline', column: 'smoke', knots: 3 }] })).toThrow(
      /"smoke"/,
    );
  });
});
