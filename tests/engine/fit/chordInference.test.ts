import { beforeEach, describe, expect, it, vi } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import type { FitResult, ModelSpec } from '../../../src/engine/core/model';
import { fit } from '../../../src/engine/fitting/fit';
import { createRng } from '../../../src/engine/numerics/rng';
import { readCsvDataset } from './helpers';

// Profile limits and term tests by chord-Newton solves (src/engine/fitting/chordSolve.ts) against the constrained
// refits they replace (refitInference: true, the method that matches the R fixtures in fit.birthwt / firth tests).

let newtonRuns = 0;
vi.mock('../../../src/engine/fitting/newton', async (importOriginal) => {
  const orig = await importOriginal<typeof import('../../../src/engine/fitting/newton')>();
  return {
    ...orig,
    newtonLogistic: (...a: Parameters<typeof orig.newtonLogistic>) => {
      newtonRuns++;
      return orig.newtonLogistic(...a);
    },
  };
});
beforeEach(() => {
  newtonRuns = 0;
});

/** Largest |a − b| / (1 + |b|) over profile limits, term χ² and the model χ² of two records. */
function inferenceGap(a: FitResult, b: FitResult): number {
  const pairs: [number | null, number | null][] = [
    ...a.coefficients.flatMap((c, j): [number | null, number | null][] => [
      [c.profileLower, b.coefficients[j].profileLower],
      [c.profileUpper, b.coefficients[j].profileUpper],
    ]),
    ...a.terms.map((t, j): [number | null, number | null] => [t.lrChi2, b.terms[j].lrChi2]),
    [a.modelLrChi2, b.modelLrChi2],
  ];
  let gap = 0;
  for (const [x, y] of pairs) {
    expect(x === null).toBe(y === null);
    if (x !== null && y !== null) gap = Math.max(gap, Math.abs(x - y) / (1 + Math.abs(y)));
  }
  return gap;
}

/** Invented data: n rows, a spline, a 4-level factor, an interaction and a strong and a weak slope. */
function invented(n: number, seed: number): { data: Dataset; spec: ModelSpec } {
  const rng = createRng(seed);
  const a = new Float64Array(n),
    b = new Float64Array(n),
    c = new Float64Array(n),
    y = new Float64Array(n);
  const g = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    a[i] = rng.normal();
    b[i] = 50 + 10 * rng.normal();
    c[i] = rng.normal();
    g[i] = Math.floor(rng.next() * 4);
    const eta = -1 + 1.5 * a[i] + (0.02 * (b[i] - 50) ** 2) / 10 + 0.05 * c[i] + 0.3 * g[i] + 0.4 * a[i] * c[i];
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  const data: Dataset = {
    nRows: n,
    columns: [
      { kind: 'numeric', name: 'a', values: a },
      { kind: 'numeric', name: 'b', values: b },
      { kind: 'numeric', name: 'c', values: c },
      { kind: 'categorical', name: 'g', codes: g, levels: ['w', 'x', 'y', 'z'] },
      { kind: 'numeric', name: 'y', values: y },
    ],
  };
  const spec: ModelSpec = {
    outcome: 'y',
    event: '1',
    terms: [
      { type: 'main', column: 'a' },
      { type: 'spline', column: 'b', knots: 4 },
      { type: 'main', column: 'c' },
      { type: 'main', column: 'g' },
      { type: 'interaction', columns: ['a', 'c'] },
    ],
  };
  return { data, spec };
}

describe('profile limits and term tests without refits', () => {
  it('equal the refits on MASS::birthwt (ML; R fixture in fit.birthwt.test.ts) to 1e-8, with no refit', () => {
    const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
    const spec: ModelSpec = {
      outcome: 'low',
      terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
        c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
      ),
    };
    const fast = fit(data, spec);
    expect(newtonRuns).toBe(1); // the fit itself: every limit and test was solved by chord steps
    const refit = fit(data, spec, { refitInference: true });
    expect(newtonRuns).toBeGreaterThan(40);
    expect(inferenceGap(fast, refit)).toBeLessThan(1e-8);
  });

  it('equal the refits for Firth on brglm2::endometrial (quasi-separated; penalised profile) to 1e-8', () => {
    const data = readCsvDataset('tests/fixtures/data/endometrial.csv');
    const spec = { outcome: 'HG', terms: ['NV', 'PI', 'EH'].map((c) => ({ type: 'main' as const, column: c })) };
    const fast = fit(data, spec, { method: 'firth' });
    const refit = fit(data, spec, { method: 'firth', refitInference: true });
    expect(inferenceGap(fast, refit)).toBeLessThan(1e-8);
  });

  it('equal the refits with splines, a factor and an interaction, small and large n (fast-start fits)', () => {
    for (const n of [300, 40_000]) {
      const { data, spec } = invented(n, n);
      const fast = fit(data, spec);
      const refit = fit(data, spec, { refitInference: true });
      expect(fast.terms.some((t) => t.df > 1)).toBe(true);
      expect(inferenceGap(fast, refit)).toBeLessThan(1e-8);
    }
  });

  it('equal the refits at another level (0.8) and for Firth at n = 2000 (1e-8)', () => {
    const { data, spec } = invented(2000, 7);
    expect(
      inferenceGap(fit(data, spec, { level: 0.8 }), fit(data, spec, { level: 0.8, refitInference: true })),
    ).toBeLessThan(1e-8);
    const firth = fit(data, spec, { method: 'firth' });
    expect(inferenceGap(firth, fit(data, spec, { method: 'firth', refitInference: true }))).toBeLessThan(1e-8);
  });
});
