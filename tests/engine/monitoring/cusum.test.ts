import { describe, expect, it } from 'vitest';
import {
  cusumLimit,
  cusumWeight,
  incrementDistribution,
  markovArl,
  runCusum,
  simulateArl,
} from '../../../src/engine/monitoring';
import { createRng } from '../../../src/engine/numerics';

// A hand-worked 10-case example from the published weight (Steiner, Cook, Farewell & Treasure 2000, Biostatistics
// 1:441, eq. 2.2): W = y·log(R_A) − log(1 − p + R_A·p). For R_A = 2 this is y·log 2 − log(1 + p); e.g. case 2
// (p = 0.10, y = 1): 0.693147 − 0.095310 = 0.597837; case 1 (p = 0.05, y = 0): −log 1.05 = −0.048790.
const p = Float64Array.from([0.05, 0.1, 0.2, 0.02, 0.3, 0.15, 0.08, 0.4, 0.05, 0.25]);
const y = Float64Array.from([0, 1, 0, 0, 1, 1, 0, 1, 0, 0]);
const W2 = [-0.04879, 0.597837, -0.182322, -0.019803, 0.430783, 0.553385, -0.076961, 0.356675, -0.04879, -0.223144];
// R_A = 0.5: y·log 0.5 − log(1 − 0.5·p); case 1: −log 0.975 = 0.025318; case 2: −0.693147 + 0.051293 = −0.641854.
const Whalf = [0.025318, -0.641854, 0.105361, 0.01005, -0.530628, -0.615186, 0.040822, -0.470004, 0.025318, 0.133531];

describe('risk-adjusted CUSUM (hand-worked from Steiner et al. 2000)', () => {
  it('gives the published log-likelihood-ratio weights', () => {
    W2.forEach((w, t) => expect(cusumWeight(y[t], p[t], 2)).toBeCloseTo(w, 6));
    Whalf.forEach((w, t) => expect(cusumWeight(y[t], p[t], 0.5)).toBeCloseTo(w, 6));
  });

  it('accumulates max(0, X + W), signals at h = 1.2 on case 6 and restarts at 0', () => {
    // By hand: 0, 0.597837, 0.415515, 0.395713, 0.826496, 1.379881 (≥ 1.2: signal, restart), then
    // max(0, −0.076961) = 0, 0.356675, 0.307885, 0.084741.
    const want = [0, 0.597837, 0.415515, 0.395713, 0.826496, 1.379881, 0, 0.356675, 0.307885, 0.084741];
    const run = runCusum(y, p, 2, 1.2);
    want.forEach((v, t) => expect(run.values[t]).toBeCloseTo(v, 6));
    expect(run.signals).toEqual([5]);
  });

  it('draws the improvement chart below zero: min(0, Z − W), signalling at −h = −0.15 on case 10', () => {
    // By hand: −0.025318, 0 (an event), −0.105361, −0.115411, 0, 0, −0.040822, 0, −0.025318, −0.158849.
    const want = [-0.025318, 0, -0.105361, -0.115411, 0, 0, -0.040822, 0, -0.025318, -0.158849];
    const run = runCusum(y, p, 0.5, 0.15);
    want.forEach((v, t) => expect(run.values[t]).toBeCloseTo(v, 6));
    expect(run.signals).toEqual([9]);
  });
});

function risks(n: number, mean: number, seed: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: n }, () => 1 / (1 + Math.exp(-(mean + 0.9 * rng.normal()))));
}

describe('control limit by Markov chain, checked by simulation', () => {
  for (const [label, risk] of [
    ['low risks (about 5 %)', risks(5000, -3, 11)],
    ['mixed risks (about 20 %)', risks(5000, -1.5, 12)],
  ] as const) {
    for (const R of [2, 0.5]) {
      it(`finds h for ARL0 = 1000 whose simulated ARL agrees within 3.5 Monte-Carlo SE — ${label}, R = ${R}`, () => {
        const dist = incrementDistribution(risk, R);
        const { h, arl0 } = cusumLimit(dist, 1000, 200);
        expect(Math.abs(arl0 - 1000)).toBeLessThan(1000 * 2e-3);
        const sim = simulateArl(risk, R, h, 1500, 7, 1e6);
        expect(sim.censored).toBe(0);
        expect(Math.abs(sim.mean - arl0)).toBeLessThan(3.5 * sim.se);
      });
    }
  }

  it('converges as the chain gets finer (M = 200 within 2 % of M = 800)', () => {
    const dist = incrementDistribution(risks(3000, -2.5, 3), 2);
    const coarse = markovArl(dist, 3, 200),
      fine = markovArl(dist, 3, 800);
    expect(Math.abs(coarse - fine) / fine).toBeLessThan(0.02);
  });

  it('gives a longer run length for a higher limit', () => {
    const dist = incrementDistribution(risks(2000, -2, 4), 2);
    expect(markovArl(dist, 4, 200)).toBeGreaterThan(markovArl(dist, 3, 200));
  });
});
