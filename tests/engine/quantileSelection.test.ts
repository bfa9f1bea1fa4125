import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { quantileBySelection, quantileSorted } from '../../src/engine/numerics/quantile';

// The selection must give the very number quantileSorted gives on a sorted copy (R's quantile type 7, Hyndman &
// Fan 1996): the calibration curve's E50 and E90 switched from a sort to it.
describe('quantileBySelection', () => {
  it('equals quantileSorted of the sorted values, bit for bit, ties and signed zeros included (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ noNaN: true })), {
          minLength: 1,
          maxLength: 60,
        }),
        fc.oneof(fc.constantFrom(0, 0.5, 0.9, 1), fc.double({ min: 0, max: 1, noNaN: true })),
        (values, q) => {
          const v = Float64Array.from(values);
          const want = quantileSorted(v.slice().sort(), q);
          expect(
            Object.is(quantileBySelection(v, q), want) ||
              (Number.isNaN(want) && Number.isNaN(quantileBySelection(v, q))),
          ).toBe(true);
        },
      ),
      { numRuns: 500 },
    );
  });

  it('leaves the values given alone and is NaN without data', () => {
    const v = Float64Array.of(3, 1, 2);
    expect(quantileBySelection(v, 0.5)).toBe(2);
    expect(Array.from(v)).toEqual([3, 1, 2]);
    expect(quantileBySelection(new Float64Array(0), 0.5)).toBeNaN();
  });
});
