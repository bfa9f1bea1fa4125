import { describe, expect, it } from 'vitest';
import { crossValidateLambda } from '../../../src/engine/penalised/crossValidation';
import { stratifiedFolds } from '../../../src/engine/penalised/folds';
import { createRng } from '../../../src/engine/numerics/rng';
import { readFixture, readPima } from './pimaData';

interface CvRef {
  alpha: number;
  measure: 'deviance' | 'mse';
  lambda: number[];
  cvm: number[];
  cvsd: number[];
  nzero: number[];
  lambdaMin: number;
  lambda1se: number;
}
interface CvFixture {
  foldid: number[];
  cv: CvRef[];
  cvGlmnet: CvRef[];
}
// Reference (glmnet-pima.R, MASS::Pima.tr, fixed fold ids): "cv" = R 4.2.2 glmnet 4.1.6 glmnet(family='binomial',
// lambda = full-data lambdas, thresh=1e-16) refitted per fold, combined with cv.glmnet's formulas written out in
// the script; "cvGlmnet" = cv.glmnet() itself, which fits folds on their own λ paths and interpolates.
// glmnet's binomial "mse" is (y−p)² summed over both classes = 2 × Brier.
const ref = readFixture<CvFixture>('glmnet-pima.json');
const pima = readPima('tr');
const problem = { X: pima.X, n: pima.n, p: pima.p, y: pima.y };

describe('crossValidateLambda', () => {
  for (const r of ref.cv) {
    it(
      `matches glmnet fold refits combined by cv.glmnet's rules: error, SE, λ_min, λ_1se to 1e-6 ` +
        `(alpha=${r.alpha}, ${r.measure})`,
      async () => {
        const folds = Int32Array.from(ref.foldid, (f) => f - 1);
        const cv = await crossValidateLambda(problem, r.alpha, {
          folds,
          criterion: r.measure === 'mse' ? 'brier' : 'deviance',
        });
        const scale = r.measure === 'mse' ? 2 : 1;
        expect(cv.path.length).toBe(r.lambda.length);
        expect(cv.path.map((row) => row.nonzero)).toEqual(r.nzero);
        for (let k = 0; k < r.lambda.length; k++) {
          expect(Math.abs(cv.path[k].lambda - r.lambda[k])).toBeLessThan(1e-12 * r.lambda[0]);
          expect(Math.abs(scale * cv.path[k].error - r.cvm[k])).toBeLessThan(1e-6 * r.cvm[k]);
          expect(Math.abs(scale * cv.path[k].se - r.cvsd[k])).toBeLessThan(1e-5 * r.cvsd[k]);
        }
        expect(cv.lambdaMin).toBeCloseTo(r.lambdaMin, 12);
        expect(cv.lambda1se).toBeCloseTo(r.lambda1se, 12);
        expect(cv.lambda1se).toBeGreaterThanOrEqual(cv.lambdaMin);
      },
    );
  }

  for (const r of ref.cvGlmnet) {
    it(`agrees with cv.glmnet's interpolated error curve to 1e-3 (alpha=${r.alpha}, ${r.measure})`, async () => {
      const folds = Int32Array.from(ref.foldid, (f) => f - 1);
      const cv = await crossValidateLambda(problem, r.alpha, {
        folds,
        criterion: r.measure === 'mse' ? 'brier' : 'deviance',
      });
      const scale = r.measure === 'mse' ? 2 : 1;
      for (let k = 0; k < r.lambda.length; k++)
        expect(Math.abs(scale * cv.path[k].error - r.cvm[k]) / r.cvm[k]).toBeLessThan(1e-3);
      expect(cv.lambda1se).toBeCloseTo(r.lambda1se, 12);
    });
  }

  it('is reproducible for a seed, reports progress per fold, and gives λ_1se ≥ λ_min', async () => {
    const seen: number[] = [];
    const a = await crossValidateLambda(problem, 1, { folds: 5, seed: 11 }, { onProgress: (d, t) => seen.push(d / t) });
    const b = await crossValidateLambda(problem, 1, { folds: 5, seed: 11 });
    expect(seen).toEqual([0.2, 0.4, 0.6, 0.8, 1]);
    expect(a.path).toEqual(b.path);
    expect(a.lambda1se).toBeGreaterThanOrEqual(a.lambdaMin);
    expect(a.path[a.index1se].error).toBeLessThanOrEqual(a.path[a.indexMin].error + a.path[a.indexMin].se);
  });

  it('stops with a "cancelled" error after the fold during which the signal was raised', async () => {
    const signal = { aborted: false };
    let done = 0;
    const run = crossValidateLambda(
      problem,
      1,
      { folds: 5 },
      {
        signal,
        onProgress: (d) => {
          done = d;
          if (d === 2) signal.aborted = true;
        },
      },
    );
    await expect(run).rejects.toMatchObject({ code: 'cancelled' });
    expect(done).toBe(2);
  });

  it('rejects an unknown criterion naming it', async () => {
    await expect(crossValidateLambda(problem, 1, { criterion: 'auc' as never })).rejects.toThrow(/auc/);
  });
});

describe('stratifiedFolds', () => {
  it('balances events across folds and fold sizes within one row', () => {
    const y = new Float64Array(103).map((_, i) => (i % 4 === 0 ? 1 : 0));
    const f = stratifiedFolds(y, 5, createRng(3));
    const size = [0, 0, 0, 0, 0],
      ev = [0, 0, 0, 0, 0];
    f.forEach((k, i) => {
      size[k]++;
      ev[k] += y[i];
    });
    expect(Math.max(...size) - Math.min(...size)).toBeLessThanOrEqual(1);
    expect(Math.max(...ev) - Math.min(...ev)).toBeLessThanOrEqual(1);
    expect(stratifiedFolds(y, 5, createRng(3))).toEqual(f);
    expect(stratifiedFolds(y, 5, createRng(4))).not.toEqual(f);
  });

  it('throws for fewer than two folds or more folds than rows', () => {
    expect(() => stratifiedFolds(new Float64Array([0, 1]), 1, createRng(1))).toThrow(/≥ 2/);
    expect(() => stratifiedFolds(new Float64Array([0, 1]), 3, createRng(1))).toThrow(/3 folds/);
  });
});

describe('crossValidateLambda on thin data', () => {
  it('throws fold-one-class when leaving a fold out removes every event', async () => {
    const y = new Float64Array(problem.n);
    y[10] = 1;
    await expect(crossValidateLambda({ ...problem, y }, 1, { folds: 5 })).rejects.toMatchObject({
      code: 'fold-one-class',
    });
  });

  it('warns when the smallest CV error sits at the end of a short path', async () => {
    const cv = await crossValidateLambda(problem, 1, { folds: 5, nLambda: 5, ratio: 0.5, criterion: 'brier' });
    expect(cv.indexMin).toBe(4);
    expect(cv.warnings.map((w) => w.code)).toContain('lambda-at-edge');
  });
});
