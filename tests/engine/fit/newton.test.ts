import { describe, expect, it } from 'vitest';
import { newtonLogistic } from '../../../src/engine/fitting/newton';
import { choleskyInverse, cholesky } from '../../../src/engine/numerics/linalg';
import { maxAbsErr, maxRelErr, readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/fit-birthwt.json, made by fit-birthwt.R with R 4.2.2 stats::glm(binomial).
const ref = readJson('tests/fixtures/reference/fit-birthwt.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv');
const col = (name: string) => (data.columns.find((c) => c.name === name) as { values: Float64Array }).values;
const n = data.nRows;

function design(names: string[]): Float64Array {
  const race = col('race');
  const X = new Float64Array(n * (names.length + 1));
  names.forEach((nm, j0) => {
    const j = j0 + 1;
    for (let i = 0; i < n; i++) {
      X[j * n + i] = nm === 'race2' ? +(race[i] === 2) : nm === 'race3' ? +(race[i] === 3) : col(nm)[i];
    }
  });
  X.fill(1, 0, n);
  return X;
}
const full = ['age', 'lwt', 'race2', 'race3', 'smoke', 'ptl', 'ht', 'ui'];
const y = col('low');

describe('newtonLogistic', () => {
  it('matches glm() coefficients, SEs and logLik on MASS::birthwt (R 4.2.2 stats::glm)', () => {
    const r = newtonLogistic({ X: design(full), n, p: 9, y });
    expect(r.converged).toBe(true);
    expect(maxRelErr(r.beta, ref.coef)).toBeLessThan(1e-8);
    const se = Array.from({ length: 9 }, (_, j) => Math.sqrt(choleskyInverse(cholesky(r.information, 9))[j * 9 + j]));
    expect(maxRelErr(se, ref.se)).toBeLessThan(1e-7);
    expect(r.logLik).toBeCloseTo(ref.logLik, 8);
    expect(r.objective).toBeCloseTo(-ref.logLik / n, 12);
    expect(r.iterations).toBeLessThan(10);
  });

  it('matches glm() with case weights (R 4.2.2 stats::glm, weights 2 on rows 1–50)', () => {
    const weights = new Float64Array(n).fill(1).fill(2, 0, 50);
    const r = newtonLogistic({ X: design(full), n, p: 9, y, weights });
    expect(maxRelErr(r.beta, ref.weighted.coef)).toBeLessThan(1e-8);
    const inv = choleskyInverse(cholesky(r.information, 9));
    expect(
      maxRelErr(
        Array.from({ length: 9 }, (_, j) => Math.sqrt(inv[j * 9 + j])),
        ref.weighted.se,
      ),
    ).toBeLessThan(1e-7);
  });

  it('matches glm() with an offset (R 4.2.2 stats::glm, offset = 0.0001·bwt)', () => {
    const offset = Float64Array.from(col('bwt'), (b) => 0.0001 * b);
    const r = newtonLogistic({ X: design(['age', 'lwt', 'smoke']), n, p: 4, y, offset });
    expect(maxRelErr(r.beta, ref.offset.coef)).toBeLessThan(1e-8);
    expect(r.logLik).toBeCloseTo(ref.offset.logLik, 8);
  });

  it('records one path entry per iteration ending at the estimate', () => {
    const r = newtonLogistic({ X: design(full), n, p: 9, y }, { recordPath: true });
    expect(r.path!.length).toBe(r.iterations);
    expect(maxAbsErr(r.path![r.path!.length - 1], r.beta)).toBe(0);
  });

  it('reports non-convergence when the iteration cap is hit', () => {
    const r = newtonLogistic({ X: design(full), n, p: 9, y }, { maxIter: 2 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(2);
  });

  it('holds a duplicated column at 0 and flags it as dropped', () => {
    const X1 = design(full);
    const X = new Float64Array(n * 10);
    X.set(X1);
    X.set(X1.subarray(n, 2 * n), 9 * n);
    const r = newtonLogistic({ X, n, p: 10, y });
    expect(Array.from(r.dropped)).toEqual([0, 0, 0, 0, 0, 0, 0, 0, 0, 1]);
    expect(r.beta[9]).toBe(0);
    expect(maxRelErr(r.beta.subarray(0, 9), ref.coef)).toBeLessThan(1e-8);
  });

  it('stays finite under complete separation', () => {
    const X = Float64Array.of(1, 1, 1, 1, 1, 1, -3, -2, -1, 1, 2, 3);
    const r = newtonLogistic({ X, n: 6, p: 2, y: Float64Array.of(0, 0, 0, 1, 1, 1) });
    expect([...r.beta, r.logLik, r.objective, ...r.information, ...r.fitted].every(Number.isFinite)).toBe(true);
    expect(r.converged).toBe(false);
    expect(r.logLik).toBeGreaterThan(-1e-6);
  });

  it(
    'matches brglm2 Firth estimates on birthwt (brglm2 0.9 glm(method = "brglmFit", type = "AS_mean"), printed ' +
      'to 12 digits)',
    () => {
      // Values printed by: glm(low ~ age + lwt + race + smoke + ptl + ht + ui, binomial, birthwt, method = "brglmFit",
      // type = "AS_mean", control = brglmControl(epsilon = 1e-14, maxit = 500)) with race a factor (R 4.2.2).
      const brglm2 = [
        0.3488566440298, -0.0253153411053, -0.0138335620647, 1.207408310206, 0.8181124578101, 0.8782206131122,
        0.5034091152312, 1.7121697801425, 0.7362392813029,
      ];
      const r = newtonLogistic({ X: design(full), n, p: 9, y, firth: true });
      expect(r.converged).toBe(true);
      expect(maxRelErr(r.beta, brglm2)).toBeLessThan(1e-6);
      expect(r.hat!.reduce((a, b) => a + b, 0)).toBeCloseTo(9, 8);
    },
  );

  it('returns a score that vanishes at the optimum and equals the free gradient of a fixed coordinate', () => {
    const r = newtonLogistic({ X: design(full), n, p: 9, y });
    expect(Math.max(...Array.from(r.score, Math.abs))).toBeLessThan(1e-6);
    const fixed = new Uint8Array(9);
    fixed[1] = 1;
    const start = Float64Array.from(r.beta);
    start[1] = 0;
    const c = newtonLogistic({ X: design(full), n, p: 9, y, fixed, start }, { information: false });
    expect(c.beta[1]).toBe(0);
    expect(Math.abs(c.score[1])).toBeGreaterThan(1);
    expect(
      Math.max(
        ...Array.from(c.score)
          .filter((_, j) => j !== 1)
          .map(Math.abs),
      ),
    ).toBeLessThan(1e-6);
    expect(-2 * c.logLik + 2 * ref.logLik).toBeCloseTo(ref.term_lr.chi2[0], 6);
  });

  it('throws a FulcraError naming a bad argument', () => {
    expect(() => newtonLogistic({ X: new Float64Array(3), n: 2, p: 2, y: new Float64Array(2) })).toThrow(
      /X has length 3/,
    );
    expect(() => newtonLogistic({ X: new Float64Array(2), n: 2, p: 1, y: Float64Array.of(0, 2) })).toThrow(
      /y\[1\] is 2/,
    );
    expect(() => newtonLogistic({ X: Float64Array.of(1, NaN), n: 2, p: 1, y: Float64Array.of(0, 1) })).toThrow(
      /value number 2 of design column 1/,
    );
  });
});
