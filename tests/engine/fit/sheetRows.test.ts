import { describe, expect, it } from 'vitest';
import { sheetRow } from '../../../src/engine/core/data';
import { designFromRecipe, linearPredictorFromRecipe } from '../../../src/engine/design/design';
import { fit } from '../../../src/engine/fitting/fit';
import { predict } from '../../../src/engine/fitting/predict';
import { importFile } from '../../../src/io/index';

const bytes = (text: string) => new TextEncoder().encode(text);

/** 12 rows of age, ward and a 0/1 outcome, with both outcomes in every ward. */
function training(): string {
  const rows = ['age,ward,ssi'];
  for (let i = 0; i < 12; i++) rows.push(`${30 + 3 * i},${'ABC'[i % 3]},${[0, 1, 1, 0][i % 4]}`);
  return rows.join('\n') + '\n';
}

describe('engine messages name spreadsheet rows (header = row 1)', async () => {
  const train = await importFile(bytes(training()), 'train.csv', {}, {});
  const model = fit(
    train.dataset,
    {
      outcome: 'ssi',
      terms: [
        { type: 'main', column: 'age' },
        { type: 'main', column: 'ward' },
      ],
    },
    {
      profile: false,
      termTests: false,
    },
  );

  it('records the spreadsheet row of the first data row on the imported Dataset', async () => {
    expect(train.dataset.firstRow).toBe(2);
    expect(sheetRow(train.dataset, 3)).toBe(5);
    const lower = await importFile(bytes('\n\nage,ward,ssi\n40,A,1\n'), 'lower.csv', {}, {});
    expect(sheetRow(lower.dataset, 0)).toBe(4);
    const bare = await importFile(bytes('40,A,1\n41,B,0\n'), 'bare.csv', { header: false }, {});
    expect(sheetRow(bare.dataset, 1)).toBe(2);
  });

  it('names row 5 of a CSV whose row 5 holds an unseen category', async () => {
    const file = 'age,ward,ssi\n41,A,0\n42,B,1\n43,Z,0\n44,C,1\n45,A,0\n';
    const next = await importFile(bytes(file.replace('43,Z', '43,A').replace('44,C', '44,Z')), 'new.csv', {}, {});
    const message = /Row 5, column "ward": the value "Z"/;
    expect(() => designFromRecipe(model.recipe, next.dataset)).toThrow(message);
    const beta = model.coefficients.map((c) => c.estimate);
    expect(() => linearPredictorFromRecipe(model.recipe, beta, next.dataset)).toThrow(message);
    expect(() => predict(model, next.dataset)).toThrow(message);
  });

  it('names the file’s row after a skipped blank row (the rows are then not consecutive)', async () => {
    const file = 'age,ward,ssi\n41,A,0\n\n42,B,1\n43,Z,0\n44,C,1\n';
    const next = await importFile(bytes(file), 'gap.csv', {}, {});
    expect(Array.from(next.dataset.rowNumbers ?? [])).toEqual([2, 4, 5, 6]);
    expect(() => designFromRecipe(model.recipe, next.dataset)).toThrow(/Row 5, column "ward": the value "Z"/);
    expect(train.dataset.rowNumbers).toBeUndefined(); // consecutive rows need no list
  });

  it('names row 5 of a CSV whose row 5 holds a value too extreme for the spline basis', async () => {
    const spline = fit(
      train.dataset,
      { outcome: 'ssi', terms: [{ type: 'spline', column: 'age', knots: 3 }] },
      { profile: false, termTests: false },
    );
    const file = 'age,ward,ssi\n41,A,0\n42,B,1\n43,C,0\n1e300,A,1\n45,B,0\n';
    const next = await importFile(bytes(file), 'extreme.csv', {}, {});
    expect(() => predict(spline, next.dataset)).toThrow(
      /of term "age \(spline\)" is \S+ in row 5: the values are too large/,
    );
  });

  it('counts rows from 1 in a file read without a header row', async () => {
    const file = '41,A,0\n42,B,1\n43,C,0\n44,A,1\n45,Z,0\n';
    const next = await importFile(bytes(file), 'bare.csv', { header: false }, {});
    const names = next.dataset.columns.map((c) => c.name);
    const recipe = {
      ...model.recipe,
      terms: model.recipe.terms.map((t) =>
        t.type === 'categorical' ? { ...t, column: names[1] } : t.type === 'numeric' ? { ...t, column: names[0] } : t,
      ),
      outcome: names[2],
    };
    expect(() => designFromRecipe(recipe, next.dataset, { outcome: 'ignore' })).toThrow(
      new RegExp(`^Row 5, column "${names[1]}": the value "Z"`),
    );
  });
});
