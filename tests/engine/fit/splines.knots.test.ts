import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import { harrellKnots, rcsKnots } from '../../../src/engine/design/splines';
import type { Dataset } from '../../../src/engine/core/data';
import { readJson } from './helpers';

// Reference: tests/fixtures/reference/knots-hmisc.json from knots-hmisc.R — Hmisc 4.8.0 on R 4.2.2,
// rcspline.eval(x, nk = 3, 4, 5, knots.only = TRUE); an empty array where Hmisc stops (fewer than 3 knots).
interface KnotCase {
  name: string;
  x: number[];
  knots3: number[];
  knots4: number[];
  knots5: number[];
}
const ref = readJson<{ cases: KnotCase[] }>('tests/fixtures/reference/knots-hmisc.json');

const maxRel = (a: number[], b: number[]) => Math.max(0, ...a.map((v, i) => Math.abs(v - b[i]) / Math.abs(b[i])));

describe("Harrell's default knot placement (Hmisc rcspline.eval)", () => {
  for (const c of ref.cases) {
    for (const k of [3, 4, 5] as const) {
      it(`places ${k} knots on ${c.name} like Hmisc to 1e-12`, () => {
        const want = c[`knots${k}`];
        const got = harrellKnots(Float64Array.from(c.x).sort(), k);
        expect(got.length).toBe(want.length);
        expect(maxRel(got, want)).toBeLessThan(1e-12);
        // rcsKnots takes unsorted values with missing ones and gives the same knots, or refuses the column
        const withMissing = [NaN, ...c.x];
        if (want.length >= 3) expect(rcsKnots(withMissing, k, 'x')).toEqual(got);
        else expect(() => rcsKnots(withMissing, k, 'x')).toThrow(/"x" has too few distinct values/);
      });
    }
  }

  it('moves the outer knots of rpart::kyphosis Age (81 values) to 2 and 175', () => {
    const age = ref.cases.find((c) => c.name.startsWith('rpart::kyphosis'))!.x;
    expect(rcsKnots(age, 3, 'Age')).toEqual([2, 97, 175]);
  });

  it('refuses fewer than 6 values, naming the column', () => {
    expect(() => rcsKnots([1, 2, 3, 4, 5, NaN], 3, 'dose')).toThrow(/"dose" has 5 values/);
    expect(harrellKnots([1, 2, 3, 4, 5], 3)).toEqual([]);
  });

  it('fits a spline with the fewer knots Hmisc gives, and says so', () => {
    const x = ref.cases.find((c) => c.name === 'six distinct values')!.x;
    const y = x.map((_, i) => (i % 3 === 0 ? 1 : 0)); // both outcomes at every value: no separation
    const data: Dataset = {
      nRows: x.length,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.from(y) },
        { kind: 'numeric', name: 'x', values: Float64Array.from(x) },
      ],
    };
    const r = fit(data, { outcome: 'y', terms: [{ type: 'spline', column: 'x', knots: 5 }] }, { profile: false });
    expect(r.recipe.terms[0]).toMatchObject({ type: 'spline', knots: [2, 3, 4, 5] });
    expect(r.coefficients.map((c) => c.name)).toEqual(['(Intercept)', 'x', "x'", "x''"]);
    const w = r.warnings.find((v) => v.code === 'spline-knots-reduced');
    expect(w?.message).toMatch(/"x".*4 knots instead of 5/);
  });
});
