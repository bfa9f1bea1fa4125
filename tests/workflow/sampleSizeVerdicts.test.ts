import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { runFit } from '../../src/cli/runFit';
import { summarise } from '../../src/cli/summary';
import { createApi } from '../../src/worker/api';

// R 4.2.2 on datasets::infert: glm(case ~ age + parity + education + induced + spontaneous, binomial) and Riley's
// closed forms give (i) 227, (ii) 146, (iii) 343 (tests/fixtures/reference/sample-size-infert.R).
const ref = JSON.parse(readFileSync('tests/fixtures/reference/sample-size-infert.json', 'utf8'));
const FILE = 'tests/fixtures/data/infert.csv';
const PREDICTORS = ['age', 'parity', 'education', 'induced', 'spontaneous'];
const IMPRECISE = "The overall risk (intercept) is imprecise: the model's average risk may be off by more than ±0.05.";

describe('sample-size verdicts on infert, where only criterion (iii) fails', () => {
  it('the page shows each criterion with its own verdict, and (iii) says the overall risk is imprecise', async () => {
    const api = createApi();
    const b = readFileSync(FILE);
    await api.importFile(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength), 'infert.csv', {}, 'import');
    const terms = PREDICTORS.map((column) => ({ type: 'main' as const, column }));
    const view = await api.fitModel({ spec: { outcome: 'case', event: '1', terms } }, 'fit');
    const lines = view.sampleSize!.lines;
    const of = (id: string) => lines.find((l) => l.startsWith(`(${id}) `))!;
    expect(of('i')).toMatch(/at least 227 cases .* Met by your 248 cases \(83 events\)\.$/);
    expect(of('ii')).toMatch(/at least 146 cases .* Met by your 248 cases \(83 events\)\.$/);
    expect(of('iii')).toContain('at least 343 cases');
    expect(of('iii')).toContain(`Not met by your 248 cases (83 events). ${IMPRECISE}`);
    expect(lines.at(-1)).toBe(
      'Your data (248 cases, 83 events, 13.8 per parameter) meet criteria (i) and (ii), which guard against ' +
        "over-fitting, but not (iii): the overall risk (intercept) is imprecise: the model's average risk may be " +
        'off by more than ±0.05.',
    );
    expect(lines.join('\n')).not.toMatch(/over-fitted|expect over-fitting/);
  }, 60_000);

  it('npm run fit gives the same criteria and prints the same lines', async () => {
    const argv = [FILE, '--outcome', 'case', '--predictors', PREDICTORS.join(',')];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    const s = run.sampleSize!;
    expect(s.criteria.map((c) => c.n)).toEqual(ref.required);
    expect(s.criteria.map((c) => [c.met, c.concerns])).toEqual([
      [true, 'overfitting'],
      [true, 'overfitting'],
      [false, 'overall-risk'],
    ]);
    expect(s.criteria[2].consequence).toBe(IMPRECISE);
    expect(s.actual).toMatchObject({ n: 248, events: 83, enough: false });
    const text = summarise(run);
    for (const line of s.summary) expect(text).toContain(`  ${line}`);
  }, 60_000);
});
