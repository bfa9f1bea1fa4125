import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { runFit } from '../../src/cli/runFit';
import { summarise } from '../../src/cli/summary';

// R 4.2.2 stats::glm and pROC 1.18.0 on MASS::birthwt (tests/fixtures/reference/points-birthwt.R): B = 5·|β_age|,
// race/smoke/ht/ui points, the model's DeLong AUC.
const ref = JSON.parse(readFileSync('tests/fixtures/reference/points-birthwt.json', 'utf8'));
const birthwt = [
  'tests/fixtures/data/birthwt.csv',
  '--outcome',
  'low',
  '--predictors',
  'age,lwt,race,smoke,ptl,ht,ui',
  '--categorical',
  'race',
  '--reference',
  'race=1',
  '--no-profile',
  '--no-term-tests',
];

describe('npm run fit --points', () => {
  it('--points-base age:5 gives the base unit, the points and the model AUC of the R + pROC rebuild', async () => {
    const argv = [...birthwt, '--points-base', 'age:5'];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    const p = run.points!;
    expect(p.score.baseUnit.rule).toBe('per-increase');
    expect(p.score.baseUnit.logOdds).toBeCloseTo(ref.B, 9);
    const pts = (term: string) => p.score.terms.find((t) => t.column === term)!.categories.map((c) => c.points);
    for (const term of ['race', 'smoke', 'ht', 'ui']) expect(pts(term)).toEqual(ref.terms[term].points);
    expect(p.evaluation.model.auc.auc).toBeCloseTo(ref.aucModel, 9);
    expect(p.evaluation.model.auc.lower).toBeCloseTo(ref.aucModelLower, 6);
    expect(p.evaluation.n).toBe(189);
    // the JSON record carries it as it is
    const json = JSON.parse(JSON.stringify(run));
    expect(json.points.score.table.length).toBe(p.score.table.length);
    const text = summarise(run);
    expect(text).toContain('Bedside points score');
    expect(text).toContain('1 point = the change in log odds of an increase of 5 in "age"');
    expect(text).toMatch(/race: 1 0; 2 \+9; 3 \+6/);
    expect(text).toContain('Not a medical device');
  }, 60_000);

  it('--points alone uses the default base unit; without it there is no points record', async () => {
    const on = await runFit(parseFitArgs([...birthwt, '--points']), [], 'test');
    expect(on.points!.score.baseUnit.rule).toBe('auto');
    expect(on.points!.score.baseUnit.widestTermPoints).toBe(10);
    const off = await runFit(parseFitArgs(birthwt), [], 'test');
    expect(off.points).toBeUndefined();
    expect(summarise(off)).not.toContain('Bedside points score');
  }, 60_000);

  it('reads the three forms of --points-base and names a bad one', () => {
    expect(parseFitArgs(['d.csv', '--outcome', 'y', '--points-base', '0.25']).pointsBase).toEqual({
      kind: 'log-odds',
      value: 0.25,
    });
    expect(parseFitArgs(['d.csv', '--outcome', 'y', '--points-base', 'auto']).points).toBe(true);
    expect(parseFitArgs(['d.csv', '--outcome', 'y', '--points-base', 'age:5']).pointsBase).toEqual({
      kind: 'per-increase',
      column: 'age',
      increase: 5,
    });
    expect(() => parseFitArgs(['d.csv', '--outcome', 'y', '--points-base', '-1'])).toThrow(/--points-base must be/);
    expect(() => parseFitArgs(['d.csv', '--outcome', 'y', '--points-base', 'age:0'])).toThrow(
      /e.g. --points-base age:5/,
    );
  });

  it('names a base-unit column that is not a linear numeric predictor', async () => {
    const argv = [...birthwt, '--points-base', 'race:1'];
    await expect(runFit(parseFitArgs(argv), argv, 'test')).rejects.toThrow(/race/);
  }, 60_000);
});
