import { describe, expect, it } from 'vitest';
import {
  bootstrapValidation,
  repeatedCrossValidation,
  type InternalValidation,
} from '../../../src/engine/validation/bootstrap';
import type { Pipeline } from '../../../src/engine/validation/pipeline';
import { simulate } from './simulate';
import { PIMA_SPEC, pimaDataset, readFixture } from './pimaData';

function pipeline(n: number, seed: number, extra: Partial<Pipeline> = {}, noise = 0): Pipeline {
  const { data, spec } = simulate(n, seed, noise);
  return { data, spec, fitOptions: {}, penalty: null, seed: 1, ...extra };
}
const row = (r: InternalValidation, m: string) => r.rows.find((x) => x.metric === m)!;

describe('bootstrapValidation', () => {
  it('is reproducible for a fixed seed and changes with the seed', async () => {
    const pl = pipeline(150, 5);
    const a = await bootstrapValidation(pl, { B: 20, seed: 9 });
    const b = await bootstrapValidation(pl, { B: 20, seed: 9 });
    const c = await bootstrapValidation(pl, { B: 20, seed: 10 });
    expect(b).toEqual(a);
    expect(row(c, 'auc').optimism).not.toBe(row(a, 'auc').optimism);
  });

  it(
    'gives apparent calibration slope 1 and intercept 0 for maximum likelihood, and corrected = apparent − ' +
      'optimism',
    async () => {
      const r = await bootstrapValidation(pipeline(120, 2), { B: 30, seed: 3 });
      // Score equations of ML logistic regression make the apparent slope exactly 1 and CITL exactly 0
      // (common practice).
      expect(row(r, 'calibrationSlope').apparent).toBeCloseTo(1, 8);
      expect(row(r, 'calibrationInTheLarge').apparent).toBeCloseTo(0, 8);
      for (const x of r.rows) expect(x.corrected).toBeCloseTo(x.apparent! - x.optimism!, 14);
      // With 120 rows and 3 predictors the model is overfitted: AUC optimism > 0, corrected slope < 1.
      expect(row(r, 'auc').optimism!).toBeGreaterThan(0);
      expect(row(r, 'calibrationSlope').corrected!).toBeLessThan(1);
      expect(row(r, 'brier').optimism!).toBeLessThan(0);
      expect(row(r, 'auc').lower!).toBeLessThanOrEqual(row(r, 'auc').upper!);
    },
  );

  it('shrinks the optimism toward 0 as n grows (simulated data with known coefficients)', async () => {
    const small = await bootstrapValidation(pipeline(100, 21, {}, 5), { B: 40, seed: 4 });
    const large = await bootstrapValidation(pipeline(4000, 22, {}, 5), { B: 40, seed: 4 });
    for (const m of ['auc', 'calibrationSlope', 'brier']) {
      expect(Math.abs(row(large, m).optimism!)).toBeLessThan(Math.abs(row(small, m).optimism!) / 5);
    }
    expect(Math.abs(row(large, 'auc').optimism!)).toBeLessThan(0.005);
    expect(Math.abs(row(large, 'calibrationSlope').optimism!)).toBeLessThan(0.02);
  });

  it('reports progress per replicate and stops within one replicate of a cancel', async () => {
    const signal = { aborted: false };
    const seen: number[] = [];
    const run = bootstrapValidation(
      pipeline(150, 5),
      { B: 50 },
      {
        signal,
        onProgress: (done, total) => {
          seen.push(done);
          expect(total).toBe(50);
          if (done === 3) signal.aborted = true;
        },
      },
    );
    await expect(run).rejects.toMatchObject({ name: 'FulcraError', code: 'cancelled' });
    expect(seen).toEqual([1, 2, 3]);
  });

  it('repeats λ selection by cross-validation inside every replicate of a lasso pipeline', async () => {
    const pl = pipeline(
      150,
      8,
      { penalty: { alpha: 1, lambda: 'cv-1se', folds: 5, criterion: 'deviance', nLambda: 30 } },
      4,
    );
    const r = await bootstrapValidation(pl, { B: 6, seed: 2 });
    expect(r.lambda).toBeGreaterThan(0);
    for (const x of r.rows) expect(Number.isFinite(x.corrected!)).toBe(true);
    // A replicate whose lasso keeps no predictor has a constant LP: AUC and Brier exist, the slope does not.
    expect(row(r, 'auc').replicates).toBe(6);
    expect(row(r, 'brier').replicates).toBe(6);
    // Shrinkage pulls predictions toward the mean, so the apparent slope of a 1se-lasso exceeds 1.
    expect(row(r, 'calibrationSlope').apparent!).toBeGreaterThan(1);
  });

  it('counts replicates that hold one outcome class only, with a warning', async () => {
    const { data, spec } = simulate(40, 3);
    const y = (data.columns[0] as { values: Float64Array }).values;
    y.fill(0);
    y[7] = 1;
    y[19] = 1;
    const r = await bootstrapValidation(
      {
        data,
        spec: { ...spec, terms: spec.terms.slice(0, 1) },
        fitOptions: { method: 'firth' },
        penalty: null,
        seed: 1,
      },
      { B: 30, seed: 1 },
    );
    expect(r.failed).toBeGreaterThan(0);
    expect(r.warnings.map((w) => w.code)).toContain('replicates-skipped');
    expect(row(r, 'auc').replicates).toBe(30 - r.failed);
  });

  it('skips, rather than fails on, replicates whose inner cross-validation runs out of events', async () => {
    const { data, spec } = simulate(60, 3);
    const y = (data.columns[0] as { values: Float64Array }).values;
    y.fill(0);
    y[3] = y[30] = y[45] = 1;
    const pl: Pipeline = {
      data,
      spec,
      fitOptions: {},
      penalty: { alpha: 1, lambda: 'cv-min', folds: 5, criterion: 'deviance', nLambda: 20 },
      seed: 1,
    };
    const r = await bootstrapValidation(pl, { B: 20, seed: 5 });
    expect(r.failed).toBeGreaterThan(0);
    expect(r.failed).toBeLessThan(20);
    expect(r.warnings.map((w) => w.code)).toContain('replicates-skipped');
  });

  it('rejects a replicate count that is not a whole number ≥ 1, naming it', async () => {
    await expect(bootstrapValidation(pipeline(50, 1), { B: 0 })).rejects.toThrow(/got 0/);
  });
});

describe('repeatedCrossValidation', () => {
  it('is reproducible, reports folds × repeats progress, and finds less optimism at larger n', async () => {
    const seen: number[] = [];
    const a = await repeatedCrossValidation(
      pipeline(150, 5, {}, 5),
      { folds: 5, repeats: 3, seed: 2 },
      { onProgress: (d) => seen.push(d) },
    );
    const b = await repeatedCrossValidation(pipeline(150, 5, {}, 5), { folds: 5, repeats: 3, seed: 2 });
    expect(b).toEqual(a);
    expect(seen).toEqual(Array.from({ length: 15 }, (_, k) => k + 1));
    expect(row(a, 'auc').optimism!).toBeGreaterThan(0);
    expect(row(a, 'calibrationSlope').corrected!).toBeLessThan(1);
    const big = await repeatedCrossValidation(pipeline(3000, 6, {}, 5), { folds: 5, repeats: 2, seed: 2 });
    expect(Math.abs(row(big, 'auc').optimism!)).toBeLessThan(row(a, 'auc').optimism! / 5);
  });

  it('stops with "cancelled" after the fold in which the signal was raised', async () => {
    const signal = { aborted: false };
    const run = repeatedCrossValidation(
      pipeline(100, 5),
      { folds: 5, repeats: 4 },
      {
        signal,
        onProgress: (d) => {
          if (d === 7) signal.aborted = true;
        },
      },
    );
    await expect(run).rejects.toMatchObject({ code: 'cancelled' });
  });
});

describe('bootstrapValidation against R', () => {
  it(
    'reproduces the optimism computed in R (glm with count weights, pROC auc) for the same 8 resamples of ' +
      'MASS::Pima.tr to 1e-6',
    async () => {
      // Reference: validate-bootstrap.R (R 4.2.2 stats::glm, pROC 1.18.0 auc, glm calibration fits).
      const ref = readFixture<{
        metrics: string[];
        counts: number[][];
        apparent: number[];
        optimism: number[];
        corrected: number[];
        optimismSd: number[];
      }>('validate-bootstrap.json');
      const r = await bootstrapValidation(
        { data: pimaDataset('tr'), spec: PIMA_SPEC, fitOptions: {}, penalty: null, seed: 1 },
        { counts: ref.counts.map((c) => Float64Array.from(c)) },
      );
      expect(r.planned).toBe(8);
      ref.metrics.forEach((m, k) => {
        const x = row(r, m);
        expect(Math.abs(x.apparent! - ref.apparent[k])).toBeLessThan(1e-6);
        expect(Math.abs(x.optimism! - ref.optimism[k])).toBeLessThan(1e-6);
        expect(Math.abs(x.corrected! - ref.corrected[k])).toBeLessThan(1e-6);
        expect(Math.abs(x.sd! - ref.optimismSd[k])).toBeLessThan(1e-6);
      });
    },
  );
});
