import { describe, expect, it } from 'vitest';
import { designFromRecipe, linearPredictorFromRecipe } from '../../../src/engine/design/design';
import { generateDemo } from '../../../src/engine/demo';
import { scoreDesign } from '../../../src/engine/validation/externalValidation';
import { fit } from '../../../src/engine/fitting/fit';
import type { ModelSpec } from '../../../src/engine/core/model';

describe('linearPredictorFromRecipe', () => {
  const demo = generateDemo('ssi');
  const specs: [string, ModelSpec][] = [
    ['the demo model (numeric and categorical terms, rows with missing values)', demo.spec],
    [
      'splines, a categorical term and a categorical × numeric interaction',
      {
        outcome: 'ssi_30d',
        event: 'yes',
        terms: [
          { type: 'spline', column: 'age', knots: 4 },
          { type: 'main', column: 'wound_class', reference: 'clean' },
          { type: 'main', column: 'duration_min' },
          { type: 'interaction', columns: ['wound_class', 'duration_min'] },
          { type: 'main', column: 'diabetes', reference: 'no' },
        ],
      },
    ],
  ];

  it.each(specs)('gives bit-for-bit scoreDesign(designFromRecipe(…)) for %s, with the same rows', (_, spec) => {
    const r = fit(demo.dataset, spec, { profile: false, termTests: false });
    const beta = r.coefficients.map((c) => c.estimate);
    const d = designFromRecipe(r.recipe, demo.dataset);
    const lp = linearPredictorFromRecipe(r.recipe, beta, demo.dataset);
    expect(Array.from(lp.eta)).toEqual(Array.from(scoreDesign(r, d.X, d.n)));
    expect(Array.from(lp.rowsUsed)).toEqual(Array.from(d.rowsUsed));
    expect(Array.from(lp.y!)).toEqual(Array.from(d.y!));
    expect(lp.droppedByColumn).toEqual(d.droppedByColumn);
    expect(lp.columnNames).toEqual(d.columnNames);
  });

  it('refuses coefficients that do not match the recipe, and an unseen level as designFromRecipe does', () => {
    const r = fit(demo.dataset, demo.spec, { profile: false, termTests: false });
    expect(() => linearPredictorFromRecipe(r.recipe, [1, 2], demo.dataset)).toThrow(
      /design columns but the model has 2/,
    );
    const other = structuredClone(demo.dataset);
    const wc = other.columns.find((c) => c.name === 'wound_class')!;
    if (wc.kind !== 'categorical') throw new Error('wound_class should be categorical');
    wc.levels = [...wc.levels, 'filthy'];
    wc.codes[5] = wc.levels.length - 1;
    const beta = r.coefficients.map((c) => c.estimate);
    expect(() => linearPredictorFromRecipe(r.recipe, beta, other)).toThrow(
      /Row 7, column "wound_class": the value "filthy"/,
    );
    expect(() => designFromRecipe(r.recipe, other)).toThrow(/Row 7, column "wound_class": the value "filthy"/);
  });
});
