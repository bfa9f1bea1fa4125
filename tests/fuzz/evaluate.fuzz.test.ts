import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { evaluate } from '../../src/engine/evaluation/evaluate';
import {
  atThreshold,
  costThresholds,
  expectedCostCurve,
  prepareThresholds,
} from '../../src/engine/evaluation/threshold';
import { nonFinitePaths } from './walk';

/** Risks that stress the logit scale and the sort: exact 0 and 1, the smallest normals, 1 − ε, heavy ties. */
const risk = fc.oneof(
  { weight: 4, arbitrary: fc.double({ min: 0, max: 1, noNaN: true }) },
  { weight: 2, arbitrary: fc.constantFrom(0, 1, 1e-300, 5e-324, 1 - 2 ** -53, 0.5, 1e-12, 1 - 1e-12) },
);
const scored = fc.array(fc.tuple(fc.constantFrom(0, 1), risk, fc.constantFrom(0, 1, 1, 2, 0.5, 1e-9)), {
  minLength: 1,
  maxLength: 120,
});
const costs = fc.record({
  missedCase: fc.constantFrom(0, 1, 5, 1e6),
  falseAlarm: fc.constantFrom(0.001, 1, 3),
  truePositiveBenefit: fc.constantFrom(undefined, 0, 2),
});

function allowedError(f: () => void): void {
  try {
    f();
  } catch (e) {
    if (!(e instanceof FulcraError)) throw e;
  }
}

describe('evaluation and thresholds under hostile predictions', () => {
  it('evaluate() throws only FulcraError and every number in its record is finite', () => {
    fc.assert(
      fc.property(scored, fc.boolean(), costs, (rows, weighted, c) => {
        const y = Float64Array.from(rows, (r) => r[0]);
        const p = Float64Array.from(rows, (r) => r[1]);
        const weights = weighted ? Float64Array.from(rows, (r) => r[2]) : undefined;
        allowedError(() => {
          const ev = evaluate(y, p, { weights, costs: c });
          expect(nonFinitePaths(ev), 'evaluation').toEqual([]);
          const events = rows.filter((r) => r[0] === 1).length;
          if (events === 0 || events === rows.length) expect(ev.warnings.length).toBeGreaterThan(0);
        });
      }),
      { numRuns: 250, seed: 424242, endOnFailure: true },
    );
  });

  it('threshold functions throw only FulcraError and return finite numbers at any threshold in [0, 1]', () => {
    fc.assert(
      fc.property(
        scored,
        fc.boolean(),
        costs,
        fc.constantFrom(0, 1, 0.5, 1e-300, 1 - 2 ** -53),
        (rows, weighted, c, t) => {
          const y = Float64Array.from(rows, (r) => r[0]);
          const p = Float64Array.from(rows, (r) => r[1]);
          const weights = weighted ? Float64Array.from(rows, (r) => r[2]) : undefined;
          allowedError(() => {
            const prep = prepareThresholds(y, p, weights);
            expect(nonFinitePaths(atThreshold(prep, t, { costs: c })), 'atThreshold').toEqual([]);
            expect(nonFinitePaths(costThresholds(prep, c)), 'costThresholds').toEqual([]);
            expect(nonFinitePaths(expectedCostCurve(prep, c)), 'expectedCostCurve').toEqual([]);
          });
        },
      ),
      { numRuns: 300, seed: 5150, endOnFailure: true },
    );
  });
});
