import { describe, expect, it } from 'vitest';
import { evaluate } from '../../src/engine/evaluation/evaluate';
import { hosmerLemeshow } from '../../src/engine/evaluation/hosmerLemeshow';
import { prCurve } from '../../src/engine/evaluation/prCurve';
import { costThresholds, expectedCostCurve, prepareThresholds } from '../../src/engine/evaluation/threshold';
import { nonFinitePaths } from './walk';

/** Minimal reproductions of evaluation bugs found by evaluate.fuzz.test.ts (see the header of hostileEngine.repro). */
describe('evaluation reproductions (fuzz findings)', () => {
  it('control: the same functions on ordinary input return only finite numbers', () => {
    const y = Float64Array.of(1, 0, 1, 0, 0, 1, 0, 0, 1, 0);
    const p = Float64Array.of(0.9, 0.1, 0.7, 0.3, 0.2, 0.6, 0.4, 0.15, 0.8, 0.5);
    expect(nonFinitePaths(evaluate(y, p, { costs: { missedCase: 5, falseAlarm: 1 } }))).toEqual([]);
    expect(nonFinitePaths(prCurve(y, p, { weights: new Float64Array(10).fill(1) }))).toEqual([]);
  });

  // prCurve.ts:42: with case weights, the highest distinct risk can carry weight 0, so precision = 0/(0 + 0) = NaN
  // and average precision (line 43) becomes NaN too. Fix: skip distinct risks whose total weight is 0.
  it('gives finite precision and average precision when the highest-risk case has weight 0', () => {
    const r = prCurve(Float64Array.of(1, 0), Float64Array.of(0.1, 0.9), { weights: Float64Array.of(1, 0) });
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // hosmerLemeshow.ts:69: an expected count that is positive but tiny (a risk of 5e-324 for an event) gives
  // (O − E)²/E = Infinity, returned as the statistic. Fix: treat a non-finite sum like the zero-expected case
  // (statistic null with the 'hl-zero-expected' warning).
  it('never returns an infinite Hosmer–Lemeshow statistic for risks of 5e-324', () => {
    const y = Float64Array.of(1, 1, 0, 0, 1, 0, 0);
    const p = Float64Array.of(1, 5e-324, 8e-28, 3e-173, 0, 1.5e-207, 8e-185);
    const hl = hosmerLemeshow(y, p);
    expect(nonFinitePaths(hl)).toEqual([]);
  });

  // threshold.ts:134 divides by the total weight: when every case weight is 0 (legal: weights ≥ 0), the expected cost
  // per 100 is 0/0 = NaN in costThresholds and expectedCostCurve. Fix: return null (as atThreshold does when
  // total is 0) or throw FulcraError('bad-weight', 'the case weights sum to 0').
  it('refuses all-zero case weights with a FulcraError instead of a NaN expected cost', () => {
    expect(() => prepareThresholds(Float64Array.of(1, 0), Float64Array.of(0.2, 0.7), Float64Array.of(0, 0))).toThrow(
      /weight is 0/,
    );
    const prep = prepareThresholds(Float64Array.of(1, 0), Float64Array.of(0.2, 0.7), Float64Array.of(0, 1));
    const costs = { missedCase: 5, falseAlarm: 1 };
    expect(nonFinitePaths([costThresholds(prep, costs), expectedCostCurve(prep, costs)])).toEqual([]);
  });
});
