import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countDistinct, summarizeNumbers } from '../../src/io/numericSummary';

describe('summarizeNumbers', () => {
  it('property: matches a sort-based median, min, max and distinct count (NaN skipped)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ noDefaultInfinity: true })), { maxLength: 300 }),
        (xs) => {
          const v = Float64Array.from(xs);
          const present = xs.filter((x) => !Number.isNaN(x)).sort((a, b) => a - b);
          const s = summarizeNumbers(v);
          expect(s.count).toBe(present.length);
          if (present.length === 0) {
            expect(s.median).toBeNaN();
            return;
          }
          const h = present.length >> 1;
          const median = present.length % 2 ? present[h] : (present[h - 1] + present[h]) / 2;
          // +0 folds −0 into 0: the two compare equal, and either may come first.
          expect(s.median + 0).toBe(median + 0);
          expect(s.min + 0).toBe(present[0] + 0);
          expect(s.max + 0).toBe(present.at(-1)! + 0);
          expect(s.distinct).toBe(new Set(present.map((x) => (x === 0 ? 0 : x))).size);
        },
      ),
      { numRuns: 1000 },
    );
  });

  it('counts −0 and 0 as one value and flags integers', () => {
    expect(countDistinct(Float64Array.from([0, -0, 1, NaN]))).toBe(2);
    expect(summarizeNumbers(Float64Array.from([1, 2, 3])).integers).toBe(true);
    expect(summarizeNumbers(Float64Array.from([1, 2.5])).integers).toBe(false);
  });
});
