import { beforeEach, describe, expect, it, vi } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { firthLogistic, firthPenalisedLogLik } from '../../../src/engine/fitting/firth';
import { firthNewtonHessian } from '../../../src/engine/fitting/firthHessian';
import type { LogisticProblem, NewtonOptions } from '../../../src/engine/fitting/newton';
import { maxRelErr, readCsvDataset, readJson } from './helpers';

// Every Newton run the engine makes is recorded (and run unchanged), to check which iteration limit it was given.
const newtonCalls: Partial<NewtonOptions>[] = [];
vi.mock('../../../src/engine/fitting/newton', async (importOriginal) => {
  const orig = await importOriginal<typeof import('../../../src/engine/fitting/newton')>();
  return {
    ...orig,
    newtonLogistic: (pr: LogisticProblem, o: Partial<NewtonOptions> = {}) => {
      newtonCalls.push(o);
      return orig.newtonLogistic(pr, o);
    },
  };
});
beforeEach(() => {
  newtonCalls.length = 0;
});

/** Column-major design with an intercept from numeric dataset columns, and the 0/1 outcome. */
function rawProblem(data: Dataset, names: string[], outcome: (i: number) => number): LogisticProblem {
  const n = data.nRows,
    p = names.length + 1;
  const X = new Float64Array(n * p).fill(1, 0, n);
  names.forEach((c, j) =>
    X.set((data.columns.find((d) => d.name === c) as { values: Float64Array }).values, (j + 1) * n),
  );
  return { X, n, p, y: Float64Array.from({ length: n }, (_, i) => outcome(i)) };
}

/** A deterministic small problem: intercept, three correlated columns, fractional case weights and an offset. */
function smallProblem(): LogisticProblem {
  const n = 40,
    p = 4;
  let s = 12345;
  const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
  const X = new Float64Array(n * p).fill(1, 0, n);
  const y = new Float64Array(n),
    weights = new Float64Array(n),
    offset = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = rnd(),
      b = rnd();
    X[n + i] = a;
    X[2 * n + i] = 0.6 * a + b;
    X[3 * n + i] = a * b + 0.3 * rnd();
    y[i] = rnd() < 0.8 * a - 0.2 ? 1 : 0;
    weights[i] = 0.5 + 1.5 * ((i * 7) % 5) * 0.25;
    offset[i] = 0.3 * rnd();
  }
  return { X, n, p, y, weights, offset };
}

/** ℓ*, its gradient, η, w, hat values and X'WX at β, from the engine's own evaluation (no iteration). */
function at(pr: LogisticProblem, beta: ArrayLike<number>) {
  const r = firthLogistic({ ...pr, start: Float64Array.from(beta) }, { maxIter: 0 });
  const N = pr.weights ? pr.weights.reduce((a, b) => a + b, 0) : pr.n;
  const eta = new Float64Array(pr.n),
    w = new Float64Array(pr.n);
  for (let i = 0; i < pr.n; i++) {
    for (let j = 0; j < pr.p; j++) eta[i] += pr.X[j * pr.n + i] * beta[j];
    eta[i] += pr.offset?.[i] ?? 0;
    const mu = 1 / (1 + Math.exp(-eta[i]));
    w[i] = (pr.weights?.[i] ?? 1) * mu * (1 - mu);
  }
  return { pll: -N * r.objective, grad: r.score, eta, w, hat: r.hat!, info: r.information };
}

describe('Hessian of the Firth penalised log-likelihood (firthHessian.ts)', () => {
  // Source of truth: central finite differences of ℓ*(β) = ℓ(β) + ½·log det X'WX as the engine evaluates it
  // (that value is checked against R in firth.test.ts); fractional weights and an offset exercise w'' = w[(1−2μ)² −
  // 2μ(1−μ)], which differs from w(1−2μ)² − 2w² when a case weight is not 1.
  const pr = smallProblem();
  const beta = [0.2, 0.8, -0.5, 0.4];
  const p = pr.p;
  const h = 1e-4;
  const shifted = (d: [number, number][]) => {
    const b = [...beta];
    for (const [j, v] of d) b[j] += v;
    return at(pr, b).pll;
  };

  it('the modified score is the gradient of ℓ*', () => {
    const g = at(pr, beta).grad;
    const fd = Array.from({ length: p }, (_, j) => (shifted([[j, h]]) - shifted([[j, -h]])) / (2 * h));
    expect(maxRelErr(g, fd)).toBeLessThan(1e-6);
  });

  it('the analytic Hessian of −ℓ* matches second central differences', () => {
    const a = at(pr, beta);
    const H = new Float64Array(p * p);
    expect(firthNewtonHessian(pr.X, pr.n, p, a.eta, a.w, a.hat, a.info, H)).toBe(true);
    let scale = 0,
      err = 0,
      fromFisher = 0;
    for (let k = 0; k < p; k++)
      for (let l = 0; l < p; l++) {
        const fd =
          -(
            shifted([
              [k, h],
              [l, h],
            ]) -
            shifted([
              [k, h],
              [l, -h],
            ]) -
            shifted([
              [k, -h],
              [l, h],
            ]) +
            shifted([
              [k, -h],
              [l, -h],
            ])
          ) /
          (4 * h * h);
        scale = Math.max(scale, Math.abs(fd));
        err = Math.max(err, Math.abs(H[k * p + l] - fd));
        fromFisher = Math.max(fromFisher, Math.abs(a.info[k * p + l] - fd));
      }
    expect(err / scale).toBeLessThan(1e-5);
    // The check can fail: X'WX alone (the Fisher-type step's matrix) is far from it.
    expect(fromFisher / scale).toBeGreaterThan(1e-3);
  });
});

// Reference: tests/fixtures/reference/firth-biopsy.json from firth-biopsy.R — brglm2 0.9 on R 4.2.2,
// glm(class ~ V1 + … + V9, method = "brglmFit", type = "AS_mean", epsilon = 1e-14) on MASS::biopsy's 683 complete
// rows, event "malignant". brglm2's own default run needs 88 iterations; the former Fisher-type step needed 135.
describe('Firth on MASS::biopsy (a case that needs many Fisher-type iterations)', () => {
  const ref = readJson('tests/fixtures/reference/firth-biopsy.json');
  const data = readCsvDataset('tests/fixtures/data/biopsy.csv', ['class']);
  const V = Array.from({ length: 9 }, (_, k) => `V${k + 1}`);
  const spec = { outcome: 'class', event: 'malignant', terms: V.map((c) => ({ type: 'main' as const, column: c })) };
  const cls = data.columns.find((c) => c.name === 'class') as { codes: Int32Array; levels: string[] };
  const malignant = cls.levels.indexOf('malignant');
  const raw = rawProblem(data, V, (i) => +(cls.codes[i] === malignant));

  it('fit() converges within 30 iterations at the default limit and matches brglm2 (1e-6 estimates, 1e-5 SEs)', () => {
    const r = fit(data, spec, { method: 'firth', profile: false, termTests: false });
    expect(r.converged).toBe(true);
    expect(r.iterations).toBeLessThanOrEqual(30);
    expect(r.coefficients.map((c) => c.name)).toEqual(ref.names);
    expect(
      maxRelErr(
        r.coefficients.map((c) => c.estimate),
        ref.coef,
      ),
    ).toBeLessThan(1e-6);
    expect(
      maxRelErr(
        r.coefficients.map((c) => c.se as number),
        ref.se,
      ),
    ).toBeLessThan(1e-5);
  });

  it('the raw-scale Newton run reaches the brglm2 optimum and log-likelihood within 30 iterations', () => {
    expect(raw.y.reduce((a, b) => a + b, 0)).toBe(ref.events);
    const r = firthLogistic(raw);
    expect(r.converged).toBe(true);
    expect(r.iterations).toBeLessThanOrEqual(30);
    expect(maxRelErr(r.beta, ref.coef)).toBeLessThan(1e-6);
    expect(firthPenalisedLogLik(r, raw)).toBeCloseTo(ref.penalised_loglik, 8);
  });

  it('case weights equal duplicated rows (weights 1, 2, 3 against the expanded data)', () => {
    // Source of truth: the same fit on the data with each row repeated weightᵢ times.
    const { X, n, p, y } = raw;
    const weights = Float64Array.from({ length: n }, (_, i) => 1 + (i % 3));
    const m = weights.reduce((a, b) => a + b, 0);
    const Xe = new Float64Array(m * p),
      ye = new Float64Array(m);
    let r = 0;
    for (let i = 0; i < n; i++)
      for (let k = 0; k < weights[i]; k++, r++) {
        ye[r] = y[i];
        for (let j = 0; j < p; j++) Xe[j * m + r] = X[j * n + i];
      }
    const a = firthLogistic({ ...raw, weights }),
      b = firthLogistic({ X: Xe, n: m, p, y: ye });
    expect(a.converged && b.converged).toBe(true);
    expect(maxRelErr(a.beta, b.beta)).toBeLessThan(1e-9);
    expect(maxRelErr(a.information, b.information)).toBeLessThan(1e-9);
    expect(firthPenalisedLogLik(a, { ...raw, weights })).toBeCloseTo(
      firthPenalisedLogLik(b, { X: Xe, n: m, p, y: ye }),
      8,
    );
  });

  it('a too small iteration limit gives a warning that names the setting', () => {
    const r = fit(data, spec, { method: 'firth', maxIter: 2, profile: false, termTests: false });
    expect(r.converged).toBe(false);
    const w = r.warnings.find((x) => x.code === 'not-converged');
    expect(w?.suggestion).toMatch(/maxIter/);
    expect(w?.suggestion).toMatch(/--max-iter/);
  });
});

// Reference: tests/fixtures/reference/firth-endometrial.json from firth-endometrial.R — brglm2 0.9 on R 4.2.2,
// glm(HG ~ NV + PI + EH, method = "brglmFit", type = "AS_mean") on brglm2::endometrial (Heinze & Schemper 2002).
describe('Firth Newton safeguards and the iteration limit on brglm2::endometrial', () => {
  const ref = readJson('tests/fixtures/reference/firth-endometrial.json');
  const data = readCsvDataset('tests/fixtures/data/endometrial.csv');
  const hg = (data.columns.find((c) => c.name === 'HG') as { values: Float64Array }).values;
  const pr = rawProblem(data, ['NV', 'PI', 'EH'], (i) => hg[i]);
  const spec = { outcome: 'HG', terms: ['NV', 'PI', 'EH'].map((c) => ({ type: 'main' as const, column: c })) };

  it('reaches the brglm2 estimate from poor starts (Hessian not positive definite there; NV quasi-separated)', () => {
    // At the first start −∇²ℓ* is not positive definite, so the first step is the Fisher-type one; from the others
    // an uncapped step lands where X'WX underflows along NV and the former iteration stopped after 1–3 steps.
    const starts = [
      [-3.29, -2.13, -0.28, 0.2],
      [-0.72, -2.4, -0.13, 1.45],
      [-2.56, -3.05, -0.1, -1.8],
    ];
    const at0 = firthLogistic({ ...pr, start: Float64Array.from(starts[0]) }, { maxIter: 0 });
    const eta = new Float64Array(pr.n),
      w = new Float64Array(pr.n);
    for (let i = 0; i < pr.n; i++) {
      for (let j = 0; j < pr.p; j++) eta[i] += pr.X[j * pr.n + i] * starts[0][j];
      w[i] = 1 / (2 + Math.exp(eta[i]) + Math.exp(-eta[i]));
    }
    const H = new Float64Array(pr.p * pr.p);
    expect(firthNewtonHessian(pr.X, pr.n, pr.p, eta, w, at0.hat!, at0.information, H)).toBe(false);
    for (const s of starts) {
      const r = firthLogistic({ ...pr, start: Float64Array.from(s) });
      expect(r.converged).toBe(true);
      expect(r.iterations).toBeLessThanOrEqual(20);
      expect(maxRelErr(r.beta, ref.coef)).toBeLessThan(1e-6);
    }
  });

  it('with a coefficient held fixed (profile likelihood) it converges to a stationary point of the free ones', () => {
    const fixed = Uint8Array.from([0, 1, 0, 0]);
    const start = Float64Array.from(ref.coef as number[]);
    start[1] = 6;
    const r = firthLogistic({ ...pr, fixed, start }, { tol: 1e-13, maxIter: 100 });
    expect(r.converged).toBe(true);
    expect(r.iterations).toBeLessThanOrEqual(10);
    expect(r.beta[1]).toBe(6);
    for (const j of [0, 2, 3]) expect(Math.abs(r.score[j])).toBeLessThan(1e-7);
  });

  it('fit() gives its iteration limit to every Newton run: main fit, profile limits and term tests', () => {
    // refitInference: the constrained refits themselves (by default they run only where chordSolve.ts fails)
    const r = fit(data, spec, { method: 'firth', maxIter: 321, refitInference: true });
    expect(r.converged).toBe(true);
    expect(newtonCalls.length).toBeGreaterThan(20);
    expect(newtonCalls.filter((o) => o.maxIter !== 321)).toEqual([]);
  });
});
