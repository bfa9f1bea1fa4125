import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { CoefficientRow, DesignRecipe } from '../../../src/engine/core';
import { compareModels, type ComparedModel } from '../../../src/engine/comparison';

// Property (follows from the definitions, no outside reference): every difference of the comparison is b − a,
// so swapping the two models negates it, and the flag tables swap "a only" with "b only".

const recipe = (columns: string[]): DesignRecipe => ({
  outcome: 'y',
  event: '1',
  terms: columns.map((column) => ({ type: 'numeric', name: column, column })),
  columnNames: ['(Intercept)', ...columns],
});
const coefficient = (name: string): CoefficientRow => ({
  name,
  term: name,
  estimate: 0,
  se: null,
  z: null,
  p: null,
  waldLower: null,
  waldUpper: null,
  profileLower: null,
  profileUpper: null,
  oddsRatio: 1,
  aliased: false,
});

function material(label: string, columns: string[], y: number[], eta: number[], deviance: number): ComparedModel {
  return {
    label,
    fit: {
      method: 'ml',
      converged: true,
      deviance,
      coefficients: ['(Intercept)', ...columns].map(coefficient),
      recipe: recipe(columns),
      aic: deviance + 2 * (columns.length + 1),
      bic: deviance + Math.log(y.length) * (columns.length + 1),
      nUsed: y.length,
    },
    y: Float64Array.from(y),
    eta: Float64Array.from(eta),
    rowsUsed: Int32Array.from(y, (_, i) => i),
  };
}

const cases = fc
  .integer({ min: 6, max: 60 })
  .chain((n) =>
    fc.record({
      y: fc.array(fc.integer({ min: 0, max: 1 }), { minLength: n, maxLength: n }),
      etaA: fc.array(fc.double({ min: -4, max: 4, noNaN: true }), { minLength: n, maxLength: n }),
      etaB: fc.array(fc.double({ min: -4, max: 4, noNaN: true }), { minLength: n, maxLength: n }),
      devA: fc.double({ min: 10, max: 200, noNaN: true }),
      devB: fc.double({ min: 10, max: 200, noNaN: true }),
      threshold: fc.double({ min: 0.05, max: 0.95, noNaN: true }),
    }),
  )
  .filter((c) => c.y.includes(0) && c.y.includes(1));

const close = (x: number | null, y: number | null) => {
  if (x === null || y === null) return expect(x).toBe(y);
  expect(Math.abs(x - y)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(x)));
};

describe('swapping the two models', () => {
  it('negates every difference and swaps "a only" with "b only"', () => {
    fc.assert(
      fc.property(cases, (c) => {
        const a = material('Model A', ['x1'], c.y, c.etaA, Math.max(c.devA, c.devB));
        const b = material('Model B', ['x1', 'x2'], c.y, c.etaB, Math.min(c.devA, c.devB));
        const ab = compareModels(a, b, { threshold: c.threshold, costs: { missedCase: 3, falseAlarm: 1 } });
        const ba = compareModels(b, a, { threshold: c.threshold, costs: { missedCase: 3, falseAlarm: 1 } });
        const neg = (v: number | null) => (v === null ? null : -v);
        close(ab.auc.difference.difference, neg(ba.auc.difference.difference));
        close(ab.auc.difference.z, neg(ba.auc.difference.z));
        close(ab.auc.difference.lower, neg(ba.auc.difference.upper));
        close(ab.brier.difference.estimate, -ba.brier.difference.estimate);
        close(ab.brier.difference.lower, neg(ba.brier.difference.upper));
        ab.netBenefit.difference.forEach((d, k) => close(d, -ba.netBenefit.difference[k]));
        close(ab.nesting.aicDifference, neg(ba.nesting.aicDifference));
        const r1 = ab.reclassification!;
        const r2 = ba.reclassification!;
        close(r1.eventNri, neg(r2.eventNri));
        close(r1.nonEventNri, neg(r2.nonEventNri));
        close(r1.costPer100!.difference, -r2.costPer100!.difference);
        for (const k of ['events', 'nonEvents', 'all'] as const) {
          expect(r1[k].aOnly).toBe(r2[k].bOnly);
          expect(r1[k].bOnly).toBe(r2[k].aOnly);
          expect(r1[k].both).toBe(r2[k].both);
        }
        // the same likelihood-ratio test, with the roles named the other way round
        expect(ab.nesting.relation).toBe('a-within-b');
        expect(ba.nesting.relation).toBe('b-within-a');
        expect(ba.nesting.lrTest).toEqual({ ...ab.nesting.lrTest!, smaller: 'b', larger: 'a' });
      }),
      { numRuns: 150 },
    );
  });

  it('does not depend on the order in which model b lists its rows', () => {
    fc.assert(
      fc.property(cases, fc.integer({ min: 1, max: 1000 }), (c, shift) => {
        const a = material('Model A', ['x1'], c.y, c.etaA, c.devA);
        const b = material('Model B', ['x2'], c.y, c.etaB, c.devB);
        const n = c.y.length;
        const order = Array.from({ length: n }, (_, i) => (i + shift) % n);
        const shuffled: ComparedModel = {
          ...b,
          y: Float64Array.from(order, (i) => b.y[i]),
          eta: Float64Array.from(order, (i) => b.eta[i]),
          rowsUsed: Int32Array.from(order),
        };
        expect(compareModels(a, shuffled, { threshold: c.threshold })).toEqual(
          compareModels(a, b, { threshold: c.threshold }),
        );
      }),
      { numRuns: 100 },
    );
  });
});
