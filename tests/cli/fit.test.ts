import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createRng } from '../../src/engine/numerics/rng';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { parseFitArgs } from '../../src/cli/args';

const ref = JSON.parse(readFileSync('tests/fixtures/reference/fit-birthwt.json', 'utf8'));
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('npm run fit', () => {
  it('prints a JSON record that matches R glm() on MASS::birthwt (R 4.2.2 stats::glm, fit-birthwt.json)', () => {
    const stdout = execFileSync(
      'npx',
      [
        'tsx',
        'src/cli/fit.ts',
        'tests/fixtures/data/birthwt.csv',
        '--outcome',
        'low',
        '--predictors',
        'age,lwt,race,smoke,ptl,ht,ui',
        '--categorical',
        'race',
        '--reference',
        'race=1',
        '--json',
      ],
      { encoding: 'utf8' },
    );
    const run = JSON.parse(stdout);
    const coefs = run.fit.coefficients as {
      estimate: number;
      se: number;
      profileLower: number;
      profileUpper: number;
    }[];
    expect(coefs).toHaveLength(ref.coef.length);
    coefs.forEach((c, j) => {
      expect(relErr(c.estimate, ref.coef[j])).toBeLessThan(1e-6);
      expect(relErr(c.se, ref.se[j])).toBeLessThan(1e-5);
    });
    expect(relErr(run.fit.deviance, ref.deviance)).toBeLessThan(1e-8);
    expect(relErr(run.fit.aic, ref.aic)).toBeLessThan(1e-8);
    expect(run.evaluation.auc.auc).toBeGreaterThan(0.5);
    expect(run.fit.warnings.map((w: { code: string }) => w.code)).toContain('low-events-per-parameter');
  }, 60_000);

  it('exits with a message naming the column when the outcome does not exist', () => {
    let stderr = '';
    try {
      execFileSync('npx', ['tsx', 'src/cli/fit.ts', 'tests/fixtures/data/birthwt.csv', '--outcome', 'lowbw'], {
        encoding: 'utf8',
        stdio: 'pipe',
      });
    } catch (e) {
      stderr = String((e as { stderr: string }).stderr);
      expect((e as { status: number }).status).toBe(2);
    }
    expect(stderr).toContain('"lowbw"');
  }, 60_000);
});

describe('npm run fit on 32 768 rows or more', () => {
  it('prints the same record on 1 and on 2 threads (the row pool changes no number)', () => {
    // 40 000 invented rows (seeded), at least POOL_MIN_ROWS = 32 768, so that two threads share the passes.
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-threads-'));
    const file = join(dir, 'rows.csv');
    const rng = createRng(4);
    const lines = ['a,b,y'];
    for (let i = 0; i < 40_000; i++) {
      const a = rng.normal(),
        b = rng.normal();
      lines.push(`${a.toFixed(4)},${b.toFixed(4)},${rng.next() < 1 / (1 + Math.exp(1 - 0.8 * a + 0.5 * b)) ? 1 : 0}`);
    }
    writeFileSync(file, lines.join('\n'));
    const run = (t: number) => {
      const out = JSON.parse(
        execFileSync('npx', ['tsx', 'src/cli/fit.ts', file, '--outcome', 'y', '--json', '--threads', String(t)], {
          encoding: 'utf8',
        }),
      );
      delete out.fulcra.command;
      return out;
    };
    const one = run(1),
      two = run(2);
    expect(two).toEqual(one);
    expect(one.fit.coefficients).toHaveLength(3);
  }, 120_000);
});

describe('parseFitArgs', () => {
  it('reads every option', () => {
    const a = parseFitArgs([
      'd.csv',
      '--outcome',
      'y',
      '--event',
      'yes',
      '--predictors',
      'a,b',
      '--categorical',
      'b',
      '--reference',
      'b=low',
      '--spline',
      'a=4',
      '--interaction',
      'a:b',
      '--costs',
      '10:1',
      '--threshold',
      '0.2',
      '--bootstrap',
      '50',
      '--seed',
      '7',
      '--threads',
      '3',
      '--json',
    ]);
    expect(a).toMatchObject({
      file: 'd.csv',
      outcome: 'y',
      event: 'yes',
      predictors: ['a', 'b'],
      categorical: ['b'],
      reference: { b: 'low' },
      splines: { a: 4 },
      interactions: [['a', 'b']],
      costs: { missedCase: 10, falseAlarm: 1 },
      threshold: 0.2,
      bootstrap: 50,
      seed: 7,
      threads: 3,
      json: true,
    });
  });

  it('reads the penalty, its λ rule, the level and the costs in the one vocabulary', () => {
    const argv = ['d.csv', '--outcome', 'y', '--penalty', 'elastic-net', '--alpha', '0.3', '--lambda-rule', 'cv-min'];
    const a = parseFitArgs([...argv, '--level', '0.9', '--costs', '10:1']);
    expect(a).toMatchObject({ penalty: 'elastic-net', alpha: 0.3, lambdaRule: 'cv-min', level: 0.9 });
    expect(a.costs).toEqual({ missedCase: 10, falseAlarm: 1 });
  });

  it.each([
    [['d.csv'], 'outcome'],
    [['--outcome', 'y'], 'data file'],
    [['d.csv', '--outcome', 'y', '--threshold', '1.5'], 'between 0 and 1'],
    [['d.csv', '--outcome', 'y', '--costs', '10'], 'NAME:VALUE'],
    [['d.csv', '--outcome', 'y', '--spline', 'a=7'], '3, 4 or 5'],
    [['d.csv', '--outcome', 'y', '--firth', '--ridge', '1'], 'one of'],
    [['d.csv', '--outcome', 'y', '--frobnicate'], 'Unknown option'],
    [['d.csv', '--outcome', 'y', '--threads', '0'], 'from 1 to 64'],
    [['d.csv', '--outcome', 'y', '--penalty', 'enet'], 'elastic-net'],
    [['d.csv', '--outcome', 'y', '--ridge', '1', '--penalty', 'lasso'], 'one of'],
    [['d.csv', '--outcome', 'y', '--lambda-rule', 'min'], 'cv-1se or cv-min'],
    [['d.csv', '--outcome', 'y', '--max-iter', '0'], '--max-iter must be a whole number from 1 to 10000, got "0"'],
    [['d.csv', '--outcome', 'y', '--max-iter', '12.5'], '--max-iter must be a whole number from 1 to 10000'],
    [['d.csv', '--outcome', 'y', '--max-iter', '20000'], '--max-iter must be a whole number from 1 to 10000'],
    [['d.csv', '--outcome', 'y', '--max-iter', 'many'], '--max-iter needs a number, got "many"'],
    [['d.csv', '--outcome', 'y', '--lambda', '0.1'], '--lambda needs --penalty ridge, lasso or elastic-net'],
    [['d.csv', '--outcome', 'y', '--ridge', '1', '--lambda', '0.1'], '--ridge L already sets λ'],
    [['d.csv', '--outcome', 'y', '--penalty', 'lasso', '--lambda', '-1'], '--lambda must be a number ≥ 0'],
    [['d.csv', '--outcome', 'y', '--penalty', 'ridge', '--lambda', '0'], '--penalty ridge needs --lambda > 0'],
    [['d.csv', '--outcome', 'y', '--penalty', 'lasso', '--lambda', '0.1', '--lambda-rule', 'cv-min'], 'either'],
  ])('rejects %j with a message', (argv, text) => {
    expect(() => parseFitArgs(argv)).toThrow(FulcraError);
    expect(() => parseFitArgs(argv)).toThrow(text);
  });
});

describe('the iteration limit and a fixed λ in npm run fit', () => {
  const biopsy = ['tests/fixtures/data/biopsy.csv', '--outcome', 'class', '--event', 'malignant', '--firth'];

  it('passes --max-iter to the Firth fit: 4 stops short on MASS::biopsy, the default converges', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const short = await runFit(parseFitArgs([...biopsy, '--max-iter', '4']), biopsy, 'test');
    expect(short.request.maxIter).toBe(4);
    expect([short.fit.converged, short.fit.iterations]).toEqual([false, 4]);
    expect(short.warnings.map((w) => w.code)).toContain('not-converged');
    const full = await runFit(parseFitArgs(biopsy), biopsy, 'test');
    expect(full.request.maxIter).toBe(50);
    expect(full.fit.converged).toBe(true);
    expect(full.fit.iterations).toBeGreaterThan(4);
    expect(full.warnings.map((w) => w.code)).not.toContain('not-converged');
  }, 60_000);

  it('as built by .ci/cli.mjs (what `npm run fit` runs) prints the record the TypeScript source prints', () => {
    const argv = ['tests/fixtures/data/birthwt.csv', '--outcome', 'low', '--categorical', 'race', '--json'];
    const strip = (out: string) => {
      const r = JSON.parse(out);
      delete r.created; // the time of the run
      return r;
    };
    const built = execFileSync('node', ['.ci/cli.mjs', 'fit', ...argv], { encoding: 'utf8', maxBuffer: 64 << 20 });
    const source = execFileSync('npx', ['tsx', 'src/cli/fit.ts', ...argv], { encoding: 'utf8', maxBuffer: 64 << 20 });
    expect(strip(built)).toEqual(strip(source));
    expect(execFileSync('node', ['.ci/cli.mjs', 'fit', '--help'], { encoding: 'utf8' })).toMatch(/^Usage: npm run fit/);
  }, 120_000);

  it('on a file of 16 MB or more (a child with huge pages on Linux) prints the same record, passes its status', () => {
    // 90 000 invented rows (seeded) of 24 numbers: about 18 MB, so .ci/cli.mjs runs the fit in a child process
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-large-'));
    const file = join(dir, 'large.csv');
    const rng = createRng(16);
    const lines = [[...Array.from({ length: 23 }, (_, j) => `x${j + 1}`), 'y'].join(',')];
    for (let i = 0; i < 90_000; i++) {
      const x = Array.from({ length: 23 }, () => rng.normal());
      lines.push([...x.map((v) => v.toFixed(5)), rng.next() < 1 / (1 + Math.exp(1 - 0.5 * x[0])) ? 1 : 0].join(','));
    }
    writeFileSync(file, lines.join('\n') + '\n');
    expect(statSync(file).size).toBeGreaterThanOrEqual(16 * 2 ** 20);
    const run = (env: Record<string, string>) => {
      const r = JSON.parse(
        execFileSync('node', ['.ci/cli.mjs', 'fit', file, '--outcome', 'y', '--predictors', 'x1,x2,x3', '--json'], {
          encoding: 'utf8',
          maxBuffer: 64 << 20,
          env: { ...process.env, ...env },
        }),
      );
      delete r.created;
      return r;
    };
    expect(run({})).toEqual(run({ FULCRA_NO_HUGE_PAGES: '1' }));
    // a failure in the child reaches the caller with its status and message
    try {
      execFileSync('node', ['.ci/cli.mjs', 'fit', file, '--outcome', 'nope'], { encoding: 'utf8', stdio: 'pipe' });
      expect.unreachable('an unknown outcome column must fail');
    } catch (e) {
      expect((e as { status: number }).status).toBe(2);
      expect((e as { stderr: string }).stderr).toContain('"nope"');
    }
    rmSync(dir, { recursive: true, force: true });
  }, 120_000);

  it('states the penalised objective and the new options in --help', () => {
    const help = execFileSync('npx', ['tsx', 'src/cli/fit.ts', '--help'], { encoding: 'utf8' });
    expect(help).toContain('−(1/n)·loglik + λ·[(1−α)/2·‖β‖² + α·‖β‖₁]');
    expect(help).toContain('unit population SD');
    expect(help).toContain('intercept not penalised');
    expect(help).toMatch(/--max-iter N\s+iteration limit/);
    expect(help).toMatch(/--lambda L\s+a fixed lambda/);
    expect(help).toMatch(/--ridge L\s+shorthand for --penalty ridge --lambda L/);
  });

  // R 4.2.2, glmnet 4.1.6: glmnet(family = 'binomial', thresh = 1e-16) on MASS::Pima.tr at fixed λ
  // (glmnet-pima.R); the same tolerance as tests/engine/validate/lambdaPath.test.ts.
  const glmnet = JSON.parse(readFileSync('tests/fixtures/reference/glmnet-pima.json', 'utf8')) as {
    predictors: string[];
    fixed: { alpha: number; lambda: number; coef: number[] }[];
  };
  const pima = ['tests/fixtures/data/validate-pima-tr.csv', '--outcome', 'type', '--event', 'Yes'];
  it.each([
    ['lasso', 1, 0.03],
    ['lasso', 1, 0.1],
    ['elastic-net', 0.5, 0.01],
  ] as const)(
    '--penalty %s (α = %s) --lambda %s matches glmnet at that λ, with no cross-validation',
    (penalty, alpha, lambda) => {
      const ref = glmnet.fixed.find((f) => f.alpha === alpha && f.lambda === lambda)!;
      const argv = [
        ...pima,
        '--predictors',
        glmnet.predictors.join(','),
        '--penalty',
        penalty,
        '--lambda',
        String(lambda),
      ];
      if (penalty === 'elastic-net') argv.push('--alpha', String(alpha));
      const run = JSON.parse(
        execFileSync('npx', ['tsx', 'src/cli/fit.ts', ...argv, '--json'], { encoding: 'utf8', maxBuffer: 64 << 20 }),
      );
      expect(run.fit.method).toBe(penalty);
      expect(run.lambda).toMatchObject({ rule: 'fixed', alpha, chosen: lambda, folds: null, path: [] });
      const est = (run.fit.coefficients as { estimate: number }[]).map((c) => c.estimate);
      expect(est).toHaveLength(ref.coef.length);
      est.forEach((b, k) => {
        expect(Math.abs(b - ref.coef[k]) / Math.max(1, Math.abs(ref.coef[k]))).toBeLessThan(1e-6);
        expect(b === 0).toBe(ref.coef[k] === 0);
      });
    },
    60_000,
  );

  it('keeps --ridge L as a shorthand: the same record as --penalty ridge --lambda L', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const a = ['tests/fixtures/data/birthwt.csv', '--outcome', 'low', '--predictors', 'age,lwt,smoke,ht'];
    const short = await runFit(parseFitArgs([...a, '--ridge', '0.05']), a, 'test');
    const long = await runFit(parseFitArgs([...a, '--penalty', 'ridge', '--lambda', '0.05']), a, 'test');
    expect(long.request).toEqual(short.request);
    expect(long.fit.coefficients).toEqual(short.fit.coefficients);
    expect(long.lambda).toMatchObject({ rule: 'fixed', chosen: 0.05 });
  }, 60_000);

  it('with a fixed λ, --cv K is repeated cross-validation of the procedure, not λ selection', async () => {
    const { requestFromArgs } = await import('../../src/cli/runFit');
    const spec = { outcome: 'y', terms: [] };
    const fixed = requestFromArgs(
      parseFitArgs(['d.csv', '--outcome', 'y', '--penalty', 'lasso', '--lambda', '0.1', '--cv', '5']),
      spec,
    );
    expect(fixed).toMatchObject({ method: 'lasso', lambda: 0.1, folds: undefined });
    expect(fixed.validation).toMatchObject({ method: 'repeated-cv', folds: 5 });
    const cv = requestFromArgs(parseFitArgs(['d.csv', '--outcome', 'y', '--penalty', 'lasso', '--cv', '5']), spec);
    expect(cv).toMatchObject({ method: 'lasso', lambda: undefined, folds: 5, validation: undefined });
  });
});

describe('runFit (the record behind npm run fit --json)', () => {
  // fixture validate-recalibration.json, R 4.2.2 stats::glm with an offset
  it('validates externally with the calibration-in-the-large and slope of R glm with an offset', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const rec = JSON.parse(readFileSync('tests/fixtures/reference/validate-recalibration.json', 'utf8'));
    const argv = [
      'tests/fixtures/data/validate-pima-tr.csv',
      '--outcome',
      'type',
      '--event',
      'Yes',
      '--test',
      'tests/fixtures/data/validate-pima-te.csv',
      '--costs',
      '4:1',
    ];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    run.fit!.coefficients.forEach((c, j) => expect(relErr(c.estimate, rec.devCoef[j])).toBeLessThan(1e-6));
    const cal = run.external!.evaluation.calibration;
    expect(cal.interceptInTheLarge!.estimate).toBeCloseTo(rec.citlCoef[0], 6);
    expect(cal.slope!.estimate).toBeCloseTo(rec.slopeCoef[1], 6);
    // p* = C_FP / (C_FP + C_FN) = 1/5 (arithmetic of the decision-theory formula)
    expect(run.evaluation.costs!.thresholds.decisionTheory.threshold).toBeCloseTo(0.2, 12);
    expect(run.evaluation.atThreshold!.threshold).toBeCloseTo(0.2, 12);
  }, 60_000);

  it('runs a lasso with λ by cross-validation and a seeded bootstrap that repeats exactly', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const argv = [
      'tests/fixtures/data/birthwt.csv',
      '--outcome',
      'low',
      '--predictors',
      'age,lwt,race,smoke,ptl,ht,ui',
      '--categorical',
      'race',
      '--penalty',
      'lasso',
      '--bootstrap',
      '5',
      '--seed',
      '11',
    ];
    const a = await runFit(parseFitArgs(argv), argv, 'test');
    const b = await runFit(parseFitArgs(argv), argv, 'test');
    expect(a.fit.method).toBe('lasso');
    expect(a.fit.coefficients.every((c) => c.se === null && c.p === null)).toBe(true);
    expect(a.lambda!.rule).toBe('cv-1se');
    expect(a.fit.lambda).toBe(a.lambda!.chosen);
    expect(a.lambda!.chosen).toBeGreaterThan(0);
    expect(a.validation!.rows).toEqual(b.validation!.rows);
    expect(a.validation!.rows.find((r) => r.metric === 'auc')!.corrected).toBeLessThanOrEqual(
      a.evaluation.auc.auc! + 1e-12,
    );
  }, 120_000);
});
