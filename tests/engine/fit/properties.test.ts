import { describe, it } from 'vitest';
import fc from 'fast-check';
import type { Dataset } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { createRng } from '../../../src/engine/numerics/rng';

/** A random, well-behaved dataset: two numeric predictors and a 3-level factor, outcome from a logistic model. */
function simulate(seed: number, n: number): Dataset {
  const rng = createRng(seed);
  const x1 = new Float64Array(n),
    x2 = new Float64Array(n),
    g = new Int32Array(n),
    y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x1[i] = rng.normal();
    x2[i] = 10 + 3 * rng.normal();
    g[i] = i % 3;
    const eta = -0.3 + 0.8 * x1[i] - 0.1 * (x2[i] - 10) + 0.5 * (g[i] === 1 ? 1 : 0);
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  return {
    nRows: n,
    columns: [
      { kind: 'numeric', name: 'y', values: y },
      { kind: 'numeric', name: 'x1', values: x1 },
      { kind: 'numeric', name: 'x2', values: x2 },
      { kind: 'categorical', name: 'g', codes: g, levels: ['a', 'b', 'c'] },
    ],
  };
}
const spec = {
  outcome: 'y',
  terms: [
    { type: 'main' as const, column: 'x1' },
    { type: 'main' as const, column: 'x2' },
    { type: 'main' as const, column: 'g', reference: 'a' },
  ],
};
const opts = { profile: false };
const est = (d: Dataset) => fit(d, spec, opts).coefficients.map((c) => c.estimate);
const ses = (d: Dataset) => fit(d, spec, opts).coefficients.map((c) => c.se!);
const close = (a: number[], b: number[], tol: number) =>
  a.every((v, i) => Math.abs(v - b[i]) <= tol * Math.max(1, Math.abs(b[i])));

function reorder(d: Dataset, order: number[]): Dataset {
  return {
    nRows: order.length,
    columns: d.columns.map((c) =>
      c.kind === 'numeric'
        ? { ...c, values: Float64Array.from(order, (i) => c.values[i]) }
        : { ...c, codes: Int32Array.from(order, (i) => c.codes[i]) },
    ),
  };
}

describe('fit properties (fast-check)', () => {
  it('is unchanged by permuting the rows', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 1, max: 1e6 }), (seed, pseed) => {
        const d = simulate(seed, 120);
        const rng = createRng(pseed);
        const order = Array.from({ length: 120 }, (_, i) => i);
        for (let i = order.length - 1; i > 0; i--) {
          const j = Math.floor(rng.next() * (i + 1));
          [order[i], order[j]] = [order[j], order[i]];
        }
        return close(est(reorder(d, order)), est(d), 1e-8);
      }),
      { numRuns: 15 },
    );
  });

  it('divides a coefficient by c when its predictor is multiplied by c', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (seed, c) => {
        const d = simulate(seed, 120);
        const scaled: Dataset = {
          ...d,
          columns: d.columns.map((col) =>
            col.name === 'x2' && col.kind === 'numeric' ? { ...col, values: col.values.map((v) => v * c) } : col,
          ),
        };
        const a = est(d),
          b = est(scaled);
        return (
          Math.abs(b[2] * c - a[2]) <= 1e-7 * Math.max(1, Math.abs(a[2])) &&
          close([b[0], b[1], b[3], b[4]], [a[0], a[1], a[3], a[4]], 1e-7)
        );
      }),
      { numRuns: 15 },
    );
  });

  it('keeps β and divides the SEs by √2 when every row is duplicated', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), (seed) => {
        const d = simulate(seed, 100);
        const twice = reorder(d, [
          ...Array.from({ length: 100 }, (_, i) => i),
          ...Array.from({ length: 100 }, (_, i) => i),
        ]);
        return (
          close(est(twice), est(d), 1e-8) &&
          close(
            ses(twice).map((s) => s * Math.SQRT2),
            ses(d),
            1e-8,
          )
        );
      }),
      { numRuns: 15 },
    );
  });
});
