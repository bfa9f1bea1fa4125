import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { logisticLoss, meanCrossEntropy, sigmoid, softplus } from '../../../src/engine/numerics/loss';
import { designFromRows } from './helpers';

describe('stable logistic loss', () => {
  it('is finite with no NaN for every |η| ≤ 1e3 and both outcomes', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e3, max: 1e3, noNaN: true }), fc.constantFrom(0, 1), (eta, y) => {
        const l = meanCrossEntropy(Float64Array.of(eta), Float64Array.of(y));
        const mu = sigmoid(eta);
        return Number.isFinite(l) && l >= 0 && mu >= 0 && mu <= 1;
      }),
    );
    for (const eta of [-1e3, -745, -40, 0, 40, 745, 1e3]) {
      expect(Number.isFinite(softplus(eta))).toBe(true);
      expect(Number.isFinite(meanCrossEntropy(Float64Array.of(eta), Float64Array.of(0)))).toBe(true);
    }
  });

  it('gives the exact large-|η| limits: loss ≈ |η| when wrong, ≈ e^−|η| when right', () => {
    expect(meanCrossEntropy(Float64Array.of(1e3), Float64Array.of(0))).toBe(1e3);
    expect(meanCrossEntropy(Float64Array.of(-1e3), Float64Array.of(1))).toBe(1e3);
    expect(meanCrossEntropy(Float64Array.of(30), Float64Array.of(1))).toBeCloseTo(Math.exp(-30), 25);
    expect(softplus(-50)).toBeCloseTo(Math.exp(-50), 40);
  });

  it('keeps its gradient and Hessian finite at |η| = 1e3', () => {
    const { X, n, p } = designFromRows([
      [1, 10],
      [1, -10],
      [1, 5],
    ]);
    const ev = logisticLoss(X, n, p, Float64Array.of(0, 1, 0), Float64Array.of(0, 100));
    expect([ev.loss, ...ev.gradient, ...ev.hessian].every(Number.isFinite)).toBe(true);
  });

  it('matches finite differences for the gradient and Hessian, with weights, offset and penalty', () => {
    const { X, n, p } = designFromRows([
      [1, 0.5, 2],
      [1, -1, 0],
      [1, 2, 1],
      [1, 0, -1],
      [1, 1.5, 0.3],
    ]);
    const y = Float64Array.of(1, 0, 1, 0, 0);
    const opts = {
      weights: Float64Array.of(1, 2, 1, 3, 1),
      offset: Float64Array.of(0.1, 0, -0.2, 0, 0.3),
      penalty: Float64Array.of(0, 0.2, 0.5),
    };
    const b = Float64Array.of(0.3, -0.4, 0.7);
    const ev = logisticLoss(X, n, p, y, b, opts);
    const h = 1e-6;
    for (let j = 0; j < p; j++) {
      const bp = Float64Array.from(b);
      bp[j] += h;
      const bm = Float64Array.from(b);
      bm[j] -= h;
      const ep = logisticLoss(X, n, p, y, bp, opts),
        em = logisticLoss(X, n, p, y, bm, opts);
      expect((ep.loss - em.loss) / (2 * h)).toBeCloseTo(ev.gradient[j], 8);
      for (let k = 0; k < p; k++)
        expect((ep.gradient[k] - em.gradient[k]) / (2 * h)).toBeCloseTo(ev.hessian[j * p + k], 7);
    }
  });
});
