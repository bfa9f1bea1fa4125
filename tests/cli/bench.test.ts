import { describe, expect, it } from 'vitest';
import { fastNewtonLogistic } from '../../src/cli/bench/fastNewton';
import { parseBenchArgs, parseSize } from '../../src/cli/bench/options';
import { judgeTargets, type BenchRecord } from '../../src/cli/bench/report';
import { synthesise, trueCoefficients } from '../../src/cli/bench/synth';
import { newtonLogistic } from '../../src/engine/newton';

describe('benchmark options', () => {
  it('reads sizes like 1e5x50 and rejects malformed ones', () => {
    expect(parseSize('1e5x50')).toEqual({ n: 100000, p: 50 });
    expect(parseBenchArgs(['--sizes', '1e4x10,2e4x3', '--json']).sizes).toEqual([{ n: 10000, p: 10 }, { n: 20000, p: 3 }]);
    expect(parseBenchArgs(['--quick']).sizes.every((s) => s.n <= 1e5)).toBe(true);
    expect(() => parseSize('1e5')).toThrow(/ROWSxPREDICTORS/);
    expect(() => parseBenchArgs(['--bogus'])).toThrow(/Unknown option/);
  });
});

describe('synthetic data', () => {
  it('has Σβ_j² = 2 over the slopes and is reproducible from its seed', () => {
    const b = trueCoefficients(50);
    let ss = 0;
    for (let j = 1; j <= 50; j++) ss += b[j] ** 2;
    expect(ss).toBeCloseTo(2, 12);
    const a = synthesise(500, 3, 7), c = synthesise(500, 3, 7);
    expect(Array.from(a.X)).toEqual(Array.from(c.X));
    expect(Array.from(a.y)).toEqual(Array.from(c.y));
    for (const v of a.X) expect(Math.round(v * 1e4) / 1e4).toBe(v);
  });
});

describe('fastNewtonLogistic (prototype)', () => {
  it('reaches the same optimum as newtonLogistic to 1e-10 when its Hessian uses a small subsample', () => {
    const n = 20000, p = 6;
    const { X: Xp, y } = synthesise(n, p - 1, 11);
    const X = new Float64Array(n * p);
    X.fill(1, 0, n);
    X.set(Xp, n);
    const ref = newtonLogistic({ X, n, p, y }, { tol: 1e-14, maxIter: 100 });
    for (const subsample of [2000, undefined]) {
      const r = fastNewtonLogistic(X, n, p, y, { subsample });
      expect(r.converged).toBe(true);
      for (let j = 0; j < p; j++) expect(Math.abs(r.beta[j] - ref.beta[j])).toBeLessThan(1e-10 * Math.abs(ref.beta[j]) + 1e-12);
      for (let k = 0; k < p * p; k++) expect(Math.abs(r.information[k] - ref.information[k])).toBeLessThan(1e-6 * Math.abs(ref.information[k]) + 1e-8);
      expect(r.logLik).toBeCloseTo(ref.logLik, 8);
    }
  });
});

describe('targets', () => {
  it('judges a fit ratio only when both fits reached 1e-8 precision', () => {
    const fit = (who: string, median: number, gap: number) => ({ who, library: '', seconds: [median], cpuSeconds: [median], median, iterations: 1, beta: [], gap, notes: [] });
    const rec: BenchRecord = {
      date: '', node: '', cpu: '', cores: 2, loadAverageAtStart: 0, quick: false, seed: 1, referenceThreads: {}, timing: '', extras: [], browser: null, targets: [],
      sizes: [{ n: 1e6, p: 50, csv: '', csvBytes: 0, eventRate: 0.3, designBytes: 8, errors: [], fits: [fit('Fulcra engine', 2, 1e-12), fit('sklearn newton-cholesky', 4, 1e-12), fit('R glm.fit', 4, 1e-6)] }],
    };
    const t = judgeTargets(rec);
    expect(t.find((x) => x.name === 'Fulcra engine 1e+6×50 / sklearn newton-cholesky')?.met).toBe(true);
    const glm = t.find((x) => x.name === 'Fulcra engine 1e+6×50 / R glm.fit');
    expect(glm?.met).toBe(false);
    expect(glm?.measured).toMatch(/precision not reached/);
  });
});
