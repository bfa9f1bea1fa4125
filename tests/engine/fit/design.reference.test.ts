import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { absenceLevel } from '../../../src/engine/design/levels';
import { buildDesign } from '../../../src/engine/design/design';
import { fit } from '../../../src/engine/fitting/fit';
import type { ModelSpec } from '../../../src/engine/core/model';
import type { Dataset } from '../../../src/engine/core/data';
import { importFile } from '../../../src/io/index';
import { generateSsiRegistry } from '../../../src/engine/demo';
import { readJson } from './helpers';

// Reference: tests/fixtures/reference/binary-reference.json from binary-reference.R — R 4.2.2
// glm(low ~ age + lwt + nonsmoker + I(white == 'TRUE') + I(normotensive == 'yes'), binomial) on MASS::birthwt with
// derived columns (tests/fixtures/data/birthwt-flags.csv): nonsmoker 0/1 (61 % ones), white TRUE/FALSE (51 %),
// normotensive no/yes (94 % yes).
const ref = readJson('tests/fixtures/reference/binary-reference.json');
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

const spec = (reference?: Record<string, string>): ModelSpec => ({
  outcome: 'low',
  terms: ['age', 'lwt', 'nonsmoker', 'white', 'normotensive'].map((column) =>
    reference?.[column] ? { type: 'main', column, reference: reference[column] } : { type: 'main', column },
  ),
});

describe('the default reference level of two-level absence/presence columns', async () => {
  const bytes = readFileSync('tests/fixtures/data/birthwt-flags.csv');
  const { dataset } = await importFile(bytes, 'birthwt-flags.csv', {}, {});

  it('fits 0/1, TRUE/FALSE and no/yes columns against 0, FALSE and no, like glm, to 1e-8', () => {
    const r = fit(dataset, spec(), { profile: false });
    expect(r.coefficients.map((c) => c.name)).toEqual(ref.names);
    r.coefficients.forEach((c, j) => {
      expect(relErr(c.estimate, ref.coef[j])).toBeLessThan(1e-8);
      expect(relErr(c.se!, ref.se[j])).toBeLessThan(1e-8);
    });
    expect(r.recipe.terms.slice(2).map((t) => (t.type === 'categorical' ? t.reference : null))).toEqual([
      '0',
      'FALSE',
      'no',
    ]);
  });

  it('keeps the reference the user chose', () => {
    const r = fit(dataset, spec({ nonsmoker: '1', normotensive: 'yes' }), { profile: false });
    expect(r.coefficients.map((c) => c.name).slice(3)).toEqual(['nonsmoker=0', 'white=TRUE', 'normotensive=no']);
    expect(relErr(r.coefficients[3].estimate, -ref.coef[3])).toBeLessThan(1e-8);
  });
});

describe('absenceLevel', () => {
  it.each([
    [['0', '1'], '0'],
    [['1', '0'], '0'],
    [['0.0', '1.0'], '0.0'],
    [['FALSE', 'TRUE'], 'FALSE'],
    [['true', 'false'], 'false'],
    [['No', 'Yes'], 'No'],
    [['Y', 'N'], 'N'],
    [['present', 'absent'], 'absent'],
    [['Positive', 'Negative'], 'Negative'],
  ])('takes the absence level of %j', (levels, want) => {
    expect(absenceLevel(levels)).toBe(want);
  });

  it.each([[['0', '2']], [['A', 'B']], [['no', 'maybe']], [['no', 'yes', 'unknown']], [['female', 'male']]])(
    'has none for %j',
    (levels) => {
      expect(absenceLevel(levels)).toBeNull();
    },
  );

  it('leaves other categorical columns on their most frequent level', () => {
    const data: Dataset = {
      nRows: 6,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.of(0, 1, 0, 1, 1, 0) },
        { kind: 'categorical', name: 'sex', codes: Int32Array.of(0, 1, 1, 1, 0, 1), levels: ['female', 'male'] },
        { kind: 'categorical', name: 'flag', codes: Int32Array.of(1, 1, 1, 1, 0, 1), levels: ['no', 'yes'] },
      ],
    };
    const d = buildDesign(data, {
      outcome: 'y',
      terms: [
        { type: 'main', column: 'sex' },
        { type: 'main', column: 'flag' },
      ],
    });
    expect(d.columnNames).toEqual(['(Intercept)', 'sex=female', 'flag=yes']);
  });
});

describe('the invented SSI demo with default reference levels', () => {
  it('names its no/yes predictors for "yes" and recovers the sign of their true coefficients', () => {
    const demo = generateSsiRegistry();
    const terms = demo.spec.terms.map((t) => (t.type === 'main' ? { type: 'main' as const, column: t.column } : t));
    const r = fit(demo.dataset, { ...demo.spec, terms }, { profile: false, termTests: false });
    for (const t of demo.truth.filter((u) => u.level === 'yes')) {
      const c = r.coefficients.find((k) => k.name === `${t.column}=yes`)!;
      expect(Math.sign(c.estimate)).toBe(Math.sign(t.value));
    }
    expect(r.coefficients.map((c) => c.name)).toContain('smoker=yes');
  });
});
