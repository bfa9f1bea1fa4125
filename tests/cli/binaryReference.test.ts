import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { createModelFile } from '../../src/io/export/modelFile';
import { modelToPmml } from '../../src/io/export/pmml';

// Reference: tests/fixtures/reference/binary-reference.json from binary-reference.R — R 4.2.2 glm(binomial) on
// MASS::birthwt with 0/1 (nonsmoker), TRUE/FALSE (white) and no/yes (normotensive) columns, each coded against
// 0 / FALSE / no although the other level is the more frequent one.
const ref = JSON.parse(readFileSync('tests/fixtures/reference/binary-reference.json', 'utf8'));
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('npm run fit on 0/1, TRUE/FALSE and no/yes predictors', () => {
  it('names and estimates the presence levels like glm to 1e-8; the model file and PMML follow', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const argv = [
      'tests/fixtures/data/birthwt-flags.csv',
      '--outcome',
      'low',
      '--predictors',
      'age,lwt,nonsmoker,white,normotensive',
    ];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    const f = run.fit!;
    expect(f.coefficients.map((c) => c.name)).toEqual(ref.names);
    f.coefficients.forEach((c, j) => {
      expect(relErr(c.estimate, ref.coef[j])).toBeLessThan(1e-8);
      expect(relErr(c.se!, ref.se[j])).toBeLessThan(1e-8);
    });
    const file = createModelFile(f, { fulcraVersion: 'test' });
    expect(file.recipe.terms.map((t) => (t.type === 'categorical' ? t.reference : null))).toEqual([
      null,
      null,
      '0',
      'FALSE',
      'no',
    ]);
    const xml = modelToPmml(f, { fulcraVersion: 'test', created: '2026-01-01T00:00:00Z' });
    for (const name of ref.names.slice(3) as string[]) {
      const [column, level] = name.split('=');
      expect(xml).toContain(`<CategoricalPredictor name="${column}" value="${level}"`);
    }
  }, 60_000);
});
