import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { caseLoss } from '../../../src/engine/numerics/loss';
import { gridLossSums, lossSurface } from '../../../src/engine/fitting/lossSurface';
import type { ModelSpec } from '../../../src/engine/core/model';
import { createRng } from '../../../src/engine/numerics/rng';

const evenly = (lo: number, hi: number, G: number) =>
  Array.from({ length: G }, (_, g) => lo + ((hi - lo) * g) / (G - 1));

function directSum(
  eta: Float64Array,
  xi: Float64Array,
  xj: Float64Array,
  y: Float64Array,
  a: number,
  b: number,
): number {
  let s = 0;
  for (let r = 0; r < eta.length; r++) s += caseLoss(eta[r] + a * xi[r] + b * xj[r], y[r]);
  return s;
}

function simulatedData(n: number, seed: number): { data: Dataset; spec: ModelSpec } {
  const rng = createRng(seed);
  const x1 = new Float64Array(n),
    x2 = new Float64Array(n),
    x3 = new Float64Array(n),
    y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x1[i] = rng.normal();
    x2[i] = 10 + 3 * rng.normal();
    x3[i] = +(rng.next() < 0.4);
    y[i] = rng.next() < 1 / (1 + Math.exp(-(-0.5 + 0.8 * x1[i] - 0.1 * (x2[i] - 10) + 0.6 * x3[i]))) ? 1 : 0;
  }
  return {
    data: {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'x1', values: x1 },
        { kind: 'numeric', name: 'x2', values: x2 },
        { kind: 'numeric', name: 'x3', values: x3 },
        { kind: 'numeric', name: 'y', values: y },
      ],
    },
    spec: {
      outcome: 'y',
      event: '1',
      terms: [
        { type: 'main', column: 'x1' },
        { type: 'main', column: 'x2' },
        { type: 'main', column: 'x3' },
      ],
    },
  };
}

describe('gridLossSums', () => {
  it('equals the direct sum of case losses at every grid point to 1e-13 relative', () => {
    const rng = createRng(3),
      n = 777;
    const eta = Float64Array.from({ length: n }, () => 2 * rng.normal());
    const xi = Float64Array.from({ length: n }, () => rng.normal());
    const xj = Float64Array.from({ length: n }, () => +(rng.next() < 0.5));
    const y = Float64Array.from({ length: n }, () => +(rng.next() < 0.4));
    const da = evenly(-3, 2, 9),
      db = evenly(-1.5, 4, 7);
    const sums = gridLossSums(eta, xi, xj, y, da, db);
    for (let b = 0; b < db.length; b++) {
      for (let a = 0; a < da.length; a++) {
        const ref = directSum(eta, xi, xj, y, da[a], db[b]);
        expect(Math.abs(sums[b * da.length + a] - ref) / ref).toBeLessThan(1e-13);
      }
    }
  });

  it(
    'flags a grid point whose product overflows as non-finite, and stays exact where the losses are huge but ' +
      'representable',
    () => {
      const eta = Float64Array.of(600, -5, 0.3),
        xi = Float64Array.of(1, 1, 1),
        xj = Float64Array.of(0, 0, 0),
        y = Float64Array.of(0, 1, 0);
      const sums = gridLossSums(eta, xi, xj, y, [-300, 0, 200], [0, 1]);
      expect(Math.abs(sums[0] - directSum(eta, xi, xj, y, -300, 0)) / directSum(eta, xi, xj, y, -300, 0)).toBeLessThan(
        1e-13,
      );
      expect(Number.isFinite(sums[2])).toBe(false); // η = 800 for the first row: e^800 overflows
    },
  );
});

describe('lossSurface on many rows', () => {
  const { data, spec } = simulatedData(25_000, 11);
  const res = fit(data, spec, { profile: false, termTests: false });

  it('uses every row when n·G² ≤ 5e8 and says so', () => {
    const s = lossSurface(res, data, { i: 1, j: 3, grid: 21 });
    expect(s.rowsUsed).toBe(25_000);
    expect(s.subsampled).toBe(false);
    expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-12);
    expect(s.minimum).toBeCloseTo(res.deviance / (2 * 25_000), 12);
  });

  it(
    'uses an evenly spaced subsample of ≥ 20 000 rows for a 150×150 grid, reports it, and keeps the minimum at ' +
      'the estimate',
    () => {
      const s = lossSurface(res, data, { i: 1, j: 3, grid: 150 });
      expect(s.subsampled).toBe(true);
      expect(s.rowsUsed).toBe(Math.floor(5e8 / 150 ** 2));
      expect(s.rowsUsed).toBeGreaterThanOrEqual(20_000);
      // the value at the estimate is the all-row objective
      expect(s.minimum).toBeCloseTo(res.deviance / (2 * 25_000), 12);
      // the grid point nearest the estimate is the lowest one up to the grid's resolution
      const G = 150;
      let best = 0;
      for (let k = 1; k < s.z.length; k++) if (s.z[k] < s.z[best]) best = k;
      const bx = s.x[best % G],
        by = s.y[Math.floor(best / G)];
      expect(Math.abs(bx - s.estimate[0])).toBeLessThanOrEqual(2 * (s.x[1] - s.x[0]));
      expect(Math.abs(by - s.estimate[1])).toBeLessThanOrEqual(2 * (s.y[1] - s.y[0]));
      expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-6);
    },
  );
});
