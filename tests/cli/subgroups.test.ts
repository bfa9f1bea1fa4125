import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { runFit } from '../../src/cli/runFit';
import { summarise } from '../../src/cli/summary';
import { toJson } from '../../src/cli/json';
import { readCsvDataset } from '../engine/fit/helpers';
import { runAnalysis, subgroupStep } from '../../src/engine/workflow';

// MASS::birthwt as shipped in tests/fixtures/data (R 4.2.2, MASS 7.3-58.2).
const BASE = [
  'tests/fixtures/data/birthwt.csv',
  '--outcome',
  'low',
  '--predictors',
  'age,lwt,race,smoke,ptl,ht,ui',
  '--categorical',
  'race',
  '--no-profile',
  '--no-term-tests',
];

describe('npm run fit --subgroups COL [--subgroup-cuts a,b,c]', () => {
  it('parses the column and the cut points', () => {
    const a = parseFitArgs([...BASE, '--subgroups', 'age', '--subgroup-cuts', '20, 25,30']);
    expect(a.subgroups).toBe('age');
    expect(a.subgroupCuts).toEqual([20, 25, 30]);
  });

  it('refuses cut points that are not numbers and cuts without a column, naming the flag', () => {
    expect(() => parseFitArgs([...BASE, '--subgroups', 'age', '--subgroup-cuts', '20,x'])).toThrow(
      /--subgroup-cuts needs numbers.*"x" is not a number/,
    );
    expect(() => parseFitArgs([...BASE, '--subgroup-cuts', '20'])).toThrow(/goes with --subgroups COL/);
    // grouped tables and weights are written out one row per case (tests/workflow/subgroupStep.test.ts)
    expect(parseFitArgs(['f.csv', '--events', 'e', '--trials', 'n', '--subgroups', 'ward']).subgroups).toBe('ward');
  });

  it('puts the page record in the JSON field `subgroups` and readable lines in the summary', async () => {
    const argv = [...BASE, '--subgroups', 'age', '--subgroup-cuts', '20,25,30', '--threshold', '0.3'];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    // The same record as the page's path: subgroupStep on runAnalysis of the same request.
    const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
    const { record, scores } = await runAnalysis(data, run.request);
    const page = subgroupStep(data, record, scores, { column: 'age', cutPoints: [20, 25, 30] });
    expect(JSON.parse(toJson(run.subgroups))).toEqual(JSON.parse(toJson(page)));
    expect(run.subgroups!.rows.map((r) => r.label)).toEqual(['< 20', '20 to < 25', '25 to < 30', '≥ 30']);
    expect(run.subgroups!.threshold).toBe(0.3);
    const text = summarise(run);
    expect(text).toContain('Performance by subgroup of "age" (4 groups, 189 rows used)');
    expect(text).toMatch(/≥ 30 +27 +4 /); // 27 mothers aged 30 or more, 4 low birth weights (hand count of birthwt)
    expect(text).toContain('[subgroup-too-small] Subgroup "≥ 30" of column "age"');
    expect(text).toContain('Too-small rule:');
  }, 60_000);

  it('says the engine message for bad cut points on the command line and exits non-zero', () => {
    let err = '';
    try {
      execFileSync('npx', ['tsx', 'src/cli/fit.ts', ...BASE, '--subgroups', 'age', '--subgroup-cuts', '30,20'], {
        encoding: 'utf8',
        stdio: 'pipe',
      });
    } catch (e) {
      err = String((e as { stderr?: string }).stderr);
    }
    expect(err).toContain('must be in increasing order, but 20 comes after 30');
  }, 60_000);
});
