import { describe, expect, it } from 'vitest';
import { pchisqUpper, pnorm, qchisq, qnorm, qt, twoSidedP } from '../../src/engine/numerics/distributions';

// Reference values: R 4.x, pnorm/qnorm/pchisq/qchisq/qt (values recalled from memory of R's output,
// and consistent with standard printed tables).
describe('distributions', () => {
  it('matches the familiar normal values', () => {
    expect(qnorm(0.975)).toBeCloseTo(1.959963984540054, 12);
    expect(pnorm(1.959963984540054)).toBeCloseTo(0.975, 12);
    expect(twoSidedP(1.959963984540054)).toBeCloseTo(0.05, 12);
  });
  it('keeps digits in the upper chi-square tail', () => {
    expect(pchisqUpper(3.841458820694124, 1)).toBeCloseTo(0.05, 12);
    expect(qchisq(0.95, 1)).toBeCloseTo(3.841458820694124, 10);
    expect(pchisqUpper(100, 1)).toBeGreaterThan(0);
    expect(pchisqUpper(100, 1)).toBeLessThan(1e-20);
    expect(pchisqUpper(0, 3)).toBe(1);
  });
  it('matches the t quantile used for small-sample intervals', () => {
    expect(qt(0.975, 10)).toBeCloseTo(2.228138851986274, 10);
  });
});
