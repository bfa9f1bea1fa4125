import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { caseQuantile, tidyStep } from '../../../src/engine/points/categories';
import { quantileSorted } from '../../../src/engine/numerics/quantile';

// Source: R's quantile(type = 7) (Hyndman & Fan 1996), which src/engine/numerics/quantile.ts implements: a row with
// frequency weight w counts as w identical cases, so the weighted quantile must equal type 7 on the repeated rows.
describe('caseQuantile (default ranges of weighted fits)', () => {
  it('equals the type-7 quantile of the sample with each row repeated weight times (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: -50, max: 50 }), fc.integer({ min: 1, max: 4 })), {
          minLength: 1,
          maxLength: 30,
        }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (rows, p) => {
          rows.sort((a, b) => a[0] - b[0]);
          const sorted = Float64Array.from(rows, (r) => r[0]);
          const weights = Float64Array.from(rows, (r) => r[1]);
          const expanded = Float64Array.from(rows.flatMap(([x, w]) => Array<number>(w).fill(x)));
          expect(caseQuantile({ sorted, weights }, p)).toBeCloseTo(quantileSorted(expanded, p), 10);
          expect(caseQuantile({ sorted, weights: null }, p)).toBe(quantileSorted(sorted, p));
        },
      ),
      { numRuns: 300 },
    );
  });
});

// Source: the rule stated in categories.ts (smallest of 1, 2, 2.5, 5 × 10^k at least a tenth of the spread).
describe('tidyStep', () => {
  it('takes the smallest tidy number at least a tenth of the spread', () => {
    expect(tidyStep(36)).toBe(5);
    expect(tidyStep(13)).toBe(2);
    expect(tidyStep(200)).toBe(20);
    expect(tidyStep(0.4)).toBe(0.05);
    expect(tidyStep(21)).toBe(2.5);
    expect(tidyStep(10)).toBe(1);
    expect(tidyStep(0)).toBeNaN();
  });
});
