import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseFitArgs, usage } from '../../src/cli/args';
import { createProgress, estimateFit, minutesWarning } from '../../src/cli/progress';
import { requestFromArgs, runFit } from '../../src/cli/runFit';
import type { Dataset } from '../../src/engine/core';
import { createRng } from '../../src/engine/numerics/rng';

/** n rows of p invented numeric predictors x1… and an outcome y (seeded). */
function invented(n: number, p: number): { csv: string; data: Dataset } {
  const rng = createRng(7);
  const cols = Array.from({ length: p }, () => new Float64Array(n));
  const y = new Float64Array(n);
  const lines = [[...cols.map((_, j) => `x${j + 1}`), 'y'].join(',')];
  for (let i = 0; i < n; i++) {
    let eta = -0.5;
    for (let j = 0; j < p; j++) {
      cols[j][i] = Math.round(rng.normal() * 1000) / 1000;
      eta += (j % 3 === 0 ? 0.4 : 0) * cols[j][i];
    }
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
    lines.push([...cols.map((c) => c[i]), y[i]].join(','));
  }
  const data: Dataset = {
    nRows: n,
    columns: [
      ...cols.map((values, j) => ({ kind: 'numeric' as const, name: `x${j + 1}`, values })),
      { kind: 'numeric' as const, name: 'y', values: y },
    ],
  };
  return { csv: lines.join('\n'), data };
}

const specOf = (p: number) => ({
  outcome: 'y',
  event: '1',
  terms: Array.from({ length: p }, (_, j) => ({ type: 'main' as const, column: `x${j + 1}` })),
});

describe('npm run fit says how long and how far', () => {
  it('offers --no-profile and --no-term-tests, and the record then has neither', async () => {
    expect(usage).toMatch(/--no-profile/);
    expect(usage).toMatch(/--no-term-tests/);
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-progress-'));
    const file = join(dir, 'small.csv');
    writeFileSync(file, invented(300, 4).csv);
    const argv = [file, '--outcome', 'y', '--no-profile', '--no-term-tests'];
    const args = parseFitArgs(argv);
    expect([args.noProfile, args.noTermTests]).toEqual([true, true]);
    const run = await runFit(args, argv, 'test');
    expect([run.request.profile, run.request.termTests]).toEqual([false, false]);
    expect(run.fit.coefficients.every((c) => c.profileLower === null && c.profileUpper === null)).toBe(true);
    expect(run.fit.terms.every((t) => t.lrChi2 === null)).toBe(true);
    const full = await runFit(parseFitArgs([file, '--outcome', 'y']), [file], 'test');
    expect(full.fit.coefficients.every((c) => c.profileLower !== null)).toBe(true);
    expect(full.fit.terms.every((t) => t.lrChi2 !== null)).toBe(true);
    // Skipping them changes no estimate.
    expect(run.fit.coefficients.map((c) => c.estimate)).toEqual(full.fit.coefficients.map((c) => c.estimate));
  });

  it('says up front when a fit will take minutes; profile limits and term tests never make it so', () => {
    // 10⁶ rows × 100 predictors: the fit alone is ~8 Newton iterations of n·p² (columns without values: the
    // estimate reads only the sizes).
    const wide: Dataset = {
      nRows: 1_000_000,
      columns: [
        ...Array.from({ length: 100 }, (_, j) => ({
          kind: 'numeric' as const,
          name: `x${j + 1}`,
          values: new Float64Array(0),
        })),
        { kind: 'numeric' as const, name: 'y', values: new Float64Array(0) },
      ],
    };
    const argsOf = (extra: string[]) => parseFitArgs(['f.csv', '--outcome', 'y', ...extra]);
    const e = estimateFit(wide, requestFromArgs(argsOf([]), specOf(100)))!;
    // the large-data rule drops both at this size (each would take over its budget)
    expect([e.profile, e.termTests]).toEqual([false, false]);
    expect(minutesWarning(e)).toMatch(/^This fit will take minutes \(roughly \d+ min on one thread\)\.$/);
    // 1000 rows × 500 predictors: profile limits and term tests within their budgets, and no warning.
    const { data } = invented(1000, 500);
    const mid = estimateFit(data, requestFromArgs(argsOf([]), specOf(500)))!;
    expect([mid.profile, mid.termTests]).toEqual([true, true]);
    expect(mid.seconds).toBeLessThan(60);
    expect(minutesWarning(mid)).toBeNull();
    // The words for what takes the time, when a long estimate does include them.
    expect(minutesWarning({ ...mid, seconds: 600 })).toMatch(
      new RegExp(
        'profile-likelihood intervals \\(two limits for each of 501 coefficients\\).*' +
          '--no-profile and --no-term-tests skip that',
      ),
    );
    const small = invented(2000, 10).data;
    expect(minutesWarning(estimateFit(small, requestFromArgs(argsOf([]), specOf(10)))!)).toBeNull();
  });

  it('is quiet for the first 2 s, then reports each stage at most once a second on its stream', async () => {
    let t = 0;
    const lines: string[] = [];
    const p = createProgress(
      (l) => lines.push(l),
      () => t,
    );
    p.stage('Fitting and checking the model');
    p.update(1, 10);
    t = 1500;
    p.update(2, 10);
    expect(lines).toEqual([]);
    t = 2100;
    p.update(3, 10);
    t = 2500;
    p.update(4, 10);
    t = 3200;
    p.update(5, 10);
    expect(lines).toEqual([
      'fulcra: Fitting and checking the model: 3 of 10 (2 s so far)',
      'fulcra: Fitting and checking the model: 5 of 10 (3 s so far)',
    ]);

    // Through runFit: a clock that moves 400 ms per reading makes the work "long"; the fit reports its steps.
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-progress-'));
    const file = join(dir, 'mid.csv');
    writeFileSync(file, invented(500, 6).csv);
    let clock = 0;
    const heard: string[] = [];
    const argv = [file, '--outcome', 'y'];
    await runFit(
      parseFitArgs(argv),
      argv,
      'test',
      createProgress(
        (l) => heard.push(l),
        () => (clock += 400),
      ),
    );
    expect(heard.some((l) => /^fulcra: Fitting and checking the model: \d+ of 14 \(\d+ s so far\)$/.test(l))).toBe(
      true,
    );
  });
});
