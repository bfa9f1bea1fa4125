import { describe, expect, it } from 'vitest';
import { pmmImpute } from '../../../src/engine/imputation/pmm';
import { createRng } from '../../../src/engine/numerics/rng';

function design(x: Float64Array) {
  const n = x.length;
  const X = new Float64Array(2 * n);
  X.fill(1, 0, n);
  X.set(x, n);
  return { X, n, q: 2 };
}

describe('pmmImpute', () => {
  it('imputes only values observed in donors', () => {
    const rng = createRng(4);
    const n = 200;
    const x = Float64Array.from({ length: n }, () => rng.normal());
    const y = Float64Array.from(x, (v) => Math.round(10 * (3 + v + 0.3 * rng.normal())) / 10);
    const obs = Int32Array.from({ length: 150 }, (_, i) => i),
      mis = Int32Array.from({ length: 50 }, (_, i) => i + 150);
    const r = pmmImpute(design(x), y, obs, mis, rng);
    const observed = new Set(Array.from(obs, (i) => y[i]));
    expect(Array.from(r.values).every((v) => observed.has(v))).toBe(true);
  });

  it('picks among the 5 donors with the closest predictions when the fit is exact', () => {
    // y = x exactly on the observed rows 0..99, so β̂ = (0, 1), σ* = 0 and β* = β̂: donors are the 5 nearest x.
    const n = 101;
    const x = Float64Array.from({ length: n }, (_, i) => (i < 100 ? i : 42.2));
    const y = Float64Array.from(x);
    const obs = Int32Array.from({ length: 100 }, (_, i) => i),
      mis = Int32Array.from([100]);
    const seen = new Set<number>();
    const rng = createRng(6);
    for (let k = 0; k < 300; k++) seen.add(pmmImpute(design(x), y, obs, mis, rng).values[0]);
    expect([...seen].sort((a, b) => a - b)).toEqual([40, 41, 42, 43, 44]);
  });

  it('recovers the mean of a variable missing at random given a predictor, where complete cases do not', () => {
    const rng = createRng(12);
    const n = 4000;
    const x = Float64Array.from({ length: n }, () => rng.normal());
    const y = Float64Array.from(x, (v) => 10 + 2 * v + rng.normal());
    const obsL: number[] = [],
      misL: number[] = [];
    for (let i = 0; i < n; i++) (rng.next() < 1 / (1 + Math.exp(-(x[i] - 0.5))) ? misL : obsL).push(i);
    const obs = Int32Array.from(obsL),
      mis = Int32Array.from(misL);
    const r = pmmImpute(design(x), y, obs, mis, rng);
    let trueMean = 0,
      ccMean = 0,
      miMean = 0;
    for (let i = 0; i < n; i++) trueMean += y[i] / n;
    for (const i of obs) ccMean += y[i] / obs.length;
    for (const i of obs) miMean += y[i] / n;
    for (const v of r.values) miMean += v / n;
    expect(Math.abs(ccMean - trueMean)).toBeGreaterThan(0.3);
    expect(Math.abs(miMean - trueMean)).toBeLessThan(0.1);
  });
});
