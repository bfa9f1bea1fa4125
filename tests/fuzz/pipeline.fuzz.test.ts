import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bootstrapValidation } from '../../src/engine/validation/bootstrap';
import { FulcraError, type Dataset } from '../../src/engine/core/data';
import { fitPipeline, type Pipeline } from '../../src/engine/validation/pipeline';
import { createRng } from '../../src/engine/numerics/rng';
import { buildCase, engineCase } from './engineData';
import { nonFinitePaths, stem } from './walk';

/**
 * Known bug (reproduced below): pipeline.ts:170 reports oddsRatio = exp(β) unclamped, so a large coefficient (a
 * predictor in tiny units, or separation) gives Infinity. Tolerated only on that field; remove when fixed.
 */
const knownOddsRatioBug = (path: string, v: number) => v === Infinity && stem(path) === 'coefficients.oddsRatio';

async function allowFulcraError<T>(run: () => Promise<T>): Promise<T | null> {
  try {
    return await run();
  } catch (e) {
    if (e instanceof FulcraError) return null;
    throw e;
  }
}

// Small cases only: the bootstrap re-runs the whole procedure per replicate.
const smallCase = engineCase.map((c) => ({ ...c, n: 5 + (c.n % 80) }));

describe('penalised pipelines and bootstrap validation under hostile designs', () => {
  it('fitPipeline (lasso at fixed λ, ML) and a 3-replicate bootstrap: only FulcraError, finite numbers', async () => {
    await fc.assert(
      fc.asyncProperty(smallCase, fc.boolean(), async (c, lasso) => {
        const { data, spec } = buildCase(c);
        const pipeline: Pipeline = {
          data,
          spec,
          seed: 1,
          fitOptions: lasso ? {} : { method: 'ml' },
          penalty: lasso ? { alpha: 1, lambda: 0.02, folds: 3, criterion: 'deviance', nLambda: 8 } : null,
        };
        const f = await allowFulcraError(() => fitPipeline(pipeline));
        if (f) expect(nonFinitePaths(f, knownOddsRatioBug), 'fitPipeline').toEqual([]);
        const b = await allowFulcraError(() => bootstrapValidation(pipeline, { B: 3, seed: 7 }));
        if (b) expect(nonFinitePaths(b), 'bootstrap').toEqual([]);
      }),
      { numRuns: 60, seed: 314159, endOnFailure: true },
    );
  }, 120_000);

  // Regression: exp(β) overflowed for β > 709.78 in pipeline.ts (now oddsRatio.ts, as fit.ts does).
  it('reports a finite odds ratio for a predictor measured in units of 1e-8', async () => {
    const n = 60,
      rng = createRng(5);
    const x = Float64Array.from({ length: n }, () => 1e-8 * rng.normal());
    const y = Float64Array.from(x, (v) => (rng.next() < 1 / (1 + Math.exp(-v * 1e8)) ? 1 : 0));
    const data: Dataset = {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'y', values: y },
        { kind: 'numeric', name: 'x', values: x },
      ],
    };
    const f = await fitPipeline({
      data,
      spec: { outcome: 'y', terms: [{ type: 'main', column: 'x' }] },
      fitOptions: { method: 'ml' },
      penalty: null,
      seed: 1,
    });
    expect(f.coefficients[1].estimate).toBeGreaterThan(710);
    expect(nonFinitePaths(f)).toEqual([]);
  });
  // Regression: withStandardised and coordinateDescent's standardise squared deviations of ~1e300 (overflow) or
  // ~1e-170 (underflow), so a varying predictor was treated as constant. Both now work on x / max|x|.
  for (const unit of [1e300, 1e-170]) {
    for (const lasso of [false, true]) {
      const kind = lasso ? 'lasso' : 'ML';
      it(`estimates a predictor in units of ${unit} like the same one in units of 1 (${kind} pipeline)`, async () => {
        const n = 60,
          rng = createRng(5);
        const u = Float64Array.from({ length: n }, () => rng.normal());
        const y = Float64Array.from(u, (v) => (rng.next() < 1 / (1 + Math.exp(-v)) ? 1 : 0));
        const run = (x: Float64Array) =>
          fitPipeline({
            data: {
              nRows: n,
              columns: [
                { kind: 'numeric', name: 'y', values: y },
                { kind: 'numeric', name: 'x', values: x },
              ],
            },
            spec: { outcome: 'y', terms: [{ type: 'main', column: 'x' }] },
            seed: 1,
            fitOptions: { method: 'ml' },
            penalty: lasso ? { alpha: 1, lambda: 0.01, folds: 3, criterion: 'deviance', nLambda: 8 } : null,
          });
        const ref = (await run(u)).coefficients[1].estimate;
        const scaled = (await run(u.map((v) => v * unit))).coefficients[1].estimate * unit;
        expect(ref).not.toBe(0);
        expect(scaled).toBeCloseTo(ref, 6);
      });
    }
  }
});
