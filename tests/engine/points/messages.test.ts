import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../../src/engine/core/data';
import type { DesignRecipe } from '../../../src/engine/core/model';
import {
  buildPointsScore,
  casePoints,
  evaluatePointsScore,
  pointsOfRows,
  readPointsScore,
  type PointsModel,
  type PointsOptions,
} from '../../../src/engine/points';
import { handData, handModel, handOptions, handRecipe } from './handModel';

// Source: the argument checks of src/engine/points (DEVELOPERS.md: invalid arguments throw FulcraError with a code
// and a message naming the value; data that cannot support the score give coded warnings). The model is the
// invented one of handModel.ts.

function thrown(f: () => unknown): FulcraError {
  try {
    f();
  } catch (e) {
    if (e instanceof FulcraError) return e;
    throw e;
  }
  throw new Error('expected a FulcraError');
}

const build = (o: Partial<PointsOptions>, model: PointsModel = handModel) =>
  buildPointsScore(model, handData, { ...handOptions, ...o });

describe('a bad base unit', () => {
  it.each([0, -0.25, NaN, Infinity, -Infinity])('refuses log odds per point = %s, naming the value', (v) => {
    const e = thrown(() => build({ baseUnit: { kind: 'log-odds', value: v } }));
    expect(e.code).toBe('bad-points-base-unit');
    expect(e.message).toContain(`got ${v}`);
    expect(e.suggestion).toMatch(/positive number/);
  });

  it.each([0, -5, NaN])('refuses an increase of %s years of age', (v) => {
    const e = thrown(() => build({ baseUnit: { kind: 'per-increase', column: 'age', increase: v } }));
    expect(e.code).toBe('bad-points-base-unit');
    expect(e.message).toContain('"age"');
  });

  it('refuses an increase of a categorical column, naming it', () => {
    const e = thrown(() => build({ baseUnit: { kind: 'per-increase', column: 'smoker', increase: 1 } }));
    expect(e.code).toBe('bad-points-base-unit');
    expect(e.message).toContain('"smoker"');
    expect(e.message).toContain('categorical');
  });

  it('refuses an increase of a predictor whose coefficient is 0', () => {
    const zero: PointsModel = {
      ...handModel,
      coefficients: handModel.coefficients.map((c) => (c.name === 'age' ? { ...c, estimate: 0 } : c)),
    };
    expect(thrown(() => build({}, zero)).message).toContain('coefficient of "age" is 0');
  });

  it('refuses a base unit so small that the totals would span more than 10 000 points', () => {
    const e = thrown(() => build({ baseUnit: { kind: 'log-odds', value: 1e-5 } }));
    expect(e.code).toBe('points-too-many');
    expect(e.suggestion).toMatch(/larger base unit/);
  });

  it('refuses the default base unit when no term has an effect', () => {
    const flat: PointsModel = {
      ...handModel,
      coefficients: handModel.coefficients.map((c) => ({ ...c, estimate: c.name === '(Intercept)' ? -2 : 0 })),
    };
    expect(thrown(() => buildPointsScore(flat, handData, { ...handOptions, baseUnit: { kind: 'auto' } })).code).toBe(
      'points-no-effects',
    );
  });
});

describe('terms the method does not cover here', () => {
  it('refuses an interaction, naming the term', () => {
    const recipe: DesignRecipe = {
      ...handRecipe,
      terms: [...handRecipe.terms, { type: 'interaction', name: 'age:smoker', parts: ['age', 'smoker'] }],
      columnNames: [...handRecipe.columnNames, 'age:smoker=yes'],
    };
    const model = { recipe, coefficients: [...handModel.coefficients, { name: 'age:smoker=yes', estimate: 0.01 }] };
    const e = thrown(() => build({}, model));
    expect(e.code).toBe('points-interaction');
    expect(e.message).toContain('"age:smoker"');
    expect(e.suggestion).toContain('"age:smoker"');
  });

  it('refuses a column entered in two terms, naming both', () => {
    const recipe: DesignRecipe = {
      ...handRecipe,
      terms: [...handRecipe.terms, { type: 'spline', name: 'age (spline)', column: 'age', knots: [30, 45, 60] }],
      columnNames: [...handRecipe.columnNames, 'age', "age'"],
    };
    const e = thrown(() => build({}, { recipe, coefficients: handModel.coefficients }));
    expect(e.code).toBe('points-column-twice');
    expect(e.message).toContain('"age" and "age (spline)"');
  });

  it('refuses a per-increase base unit on a spline term (its effect per unit is not constant)', () => {
    const recipe: DesignRecipe = {
      ...handRecipe,
      terms: handRecipe.terms.map((t) =>
        t.name === 'age' ? { type: 'spline', name: 'age (spline)', column: 'age', knots: [30, 45, 60] } : t,
      ),
      columnNames: [...handRecipe.columnNames, "age'"],
    };
    const model = { recipe, coefficients: [...handModel.coefficients, { name: "age'", estimate: 0.01 }] };
    const e = thrown(() => build({}, model));
    expect(e.code).toBe('bad-points-base-unit');
    expect(e.message).toContain('spline term');
  });
});

describe('bad options', () => {
  it('names an unknown option', () => {
    const e = thrown(() => buildPointsScore(handModel, handData, { bins: 4 } as unknown as Partial<PointsOptions>));
    expect(e.message).toContain('"bins"');
  });

  it('refuses cut points for a categorical predictor, naming it', () => {
    const e = thrown(() => build({ cuts: { ...handOptions.cuts, smoker: [0.5] } }));
    expect(e.message).toContain('"cuts.smoker"');
  });

  it('refuses cut points that do not increase, naming the pair', () => {
    const e = thrown(() => build({ cuts: { ...handOptions.cuts, age: [40, 60, 50] } }));
    expect(e.message).toContain('"cuts.age"');
    expect(e.message).toContain('50 follows 60');
  });

  it('refuses a reference value outside its range, naming the range', () => {
    const e = thrown(() => build({ referenceValues: { ...handOptions.referenceValues, age: [35, 55, 55, 65] } }));
    expect(e.message).toContain('"referenceValues.age"');
    expect(e.message).toContain('40 to under 50');
  });

  it('refuses a reference value on the upper end of its range (it belongs to the next)', () => {
    const e = thrown(() => build({ referenceValues: { ...handOptions.referenceValues, age: [35, 50, 55, 65] } }));
    expect(e.message).toContain('50 lies outside its range "40 to under 50"');
  });

  it('refuses reference values whose number does not match the ranges', () => {
    const e = thrown(() => build({ referenceValues: { ...handOptions.referenceValues, chol: [180, 220] } }));
    expect(e.message).toContain('3 ranges, but 2 values');
  });

  it('refuses a number of default ranges outside 2–20', () => {
    expect(thrown(() => build({ rangesPerTerm: 1 })).message).toContain('"rangesPerTerm"');
  });
});

describe('data a score cannot read', () => {
  const score = buildPointsScore(handModel, handData, handOptions);

  it('names the column and the known levels of a value the card does not know', () => {
    const e = thrown(() => casePoints(score, { age: 50, chol: 200, hdl: 50, sbp: 120, smoker: 'ex', diabetes: 'no' }));
    expect(e.code).toBe('unseen-level');
    expect(e.message).toContain('column "smoker"');
    expect(e.message).toContain('known: no, yes');
  });

  it('names the column of text where a number belongs', () => {
    const e = thrown(() => casePoints(score, { age: 'fifty', chol: 200, hdl: 50, sbp: 120, smoker: 'no' }));
    expect(e.message).toContain('column "age"');
  });

  it('names the spreadsheet row and column of an unknown level in a dataset', () => {
    const data = {
      ...handData,
      columns: handData.columns.map((c) =>
        c.name === 'smoker' ? { ...c, levels: ['no', 'yes', 'ex'], codes: Int32Array.from([1, 2, 0]) } : c,
      ),
    };
    const e = thrown(() => pointsOfRows(score, data));
    expect(e.message).toContain('Row 3, column "smoker"');
  });

  it('refuses to evaluate on data without the outcome', () => {
    expect(thrown(() => evaluatePointsScore(score, handModel, handData)).code).toBe('points-no-outcome');
  });

  it('warns about a predictor that gets 0 points in every category', () => {
    const s = build({ baseUnit: { kind: 'log-odds', value: 2 } });
    const w = s.warnings.filter((x) => x.code === 'points-term-no-points').map((x) => x.terms![0]);
    expect(w).toEqual(['chol', 'sbp', 'smoker', 'diabetes']);
  });
});

describe('reading a stored score back', () => {
  const score = buildPointsScore(handModel, handData, handOptions);
  const stored = () => JSON.parse(JSON.stringify(score));

  it('names a damaged field: points that are not whole', () => {
    const s = stored();
    s.terms[1].categories[2].points = 1.5;
    expect(thrown(() => readPointsScore(s)).message).toContain('"points.terms[1].categories[2].points"');
  });

  it('names a table risk that is not the formula', () => {
    const s = stored();
    s.table[4].risk = 0.5;
    expect(thrown(() => readPointsScore(s)).message).toContain('"points.table[4].risk"');
  });

  it('names a total range that does not match the categories', () => {
    const s = stored();
    s.maxTotal = 19;
    expect(thrown(() => readPointsScore(s)).message).toContain('"points.maxTotal"');
  });

  it('names ranges out of order', () => {
    const s = stored();
    s.terms[0].categories[2].lower = 45;
    expect(thrown(() => readPointsScore(s)).message).toContain('"points.terms[0].categories[2].lower"');
  });
});
