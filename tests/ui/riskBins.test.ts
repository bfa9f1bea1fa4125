import { describe, expect, it } from 'vitest';
import { prepareThresholds } from '../../src/engine/evaluation';
import { cutoffWindow, riskBins, riskQuantile } from '../../src/worker/riskBins';

const y = Float64Array.from([0, 0, 1, 0, 1, 1, 0, 0, 0, 1]);
const p = Float64Array.from([0.05, 0.1, 0.15, 0.2, 0.25, 0.5, 0.55, 0.7, 0.95, 1]);
const prep = prepareThresholds(y, p);

describe('binned risks for the cut-off view', () => {
  it('counts cases with and without the event per bin, the last bin holding a risk of 1', () => {
    const b = riskBins(prep, 0, 1, 4);
    expect(b.edges).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(b.events).toEqual([1, 1, 1, 1]);
    expect(b.nonEvents).toEqual([3, 0, 2, 1]);
    expect(b.below).toEqual({ events: 0, nonEvents: 0 });
    expect(b.above).toEqual({ events: 0, nonEvents: 0 });
  });

  it('reports the cases outside a narrower window beside the bins', () => {
    const b = riskBins(prep, 0.1, 0.6, 5);
    expect(b.below).toEqual({ events: 0, nonEvents: 1 });
    expect(b.above).toEqual({ events: 1, nonEvents: 2 });
    const inBins = [...b.events, ...b.nonEvents].reduce((a, c) => a + c, 0);
    expect(inBins + 1 + 3).toBe(10);
  });

  it('finds quantiles of the risks and a window holding the 1st–99th percentiles and the marks', () => {
    expect(riskQuantile(prep, 0.5)).toBe(0.25);
    expect(riskQuantile(prep, 0.01)).toBe(0.05);
    expect(riskQuantile(prep, 0.99)).toBe(1);
    const narrow = prepareThresholds(
      Float64Array.from({ length: 200 }, (_, i) => (i % 11 === 0 ? 1 : 0)),
      Float64Array.from({ length: 200 }, (_, i) => 0.085 + (0.01 * i) / 199),
    );
    const w = cutoffWindow(narrow, [1 / 11, null]);
    expect(w.from).toBeLessThanOrEqual(0.085);
    expect(w.to).toBeGreaterThanOrEqual(0.095);
    expect(w.to - w.from).toBeLessThan(0.03);
    expect(cutoffWindow(narrow, [0.3, null]).to).toBeGreaterThanOrEqual(0.3);
  });
});
