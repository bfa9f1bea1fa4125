import { cholesky, choleskyFactorInverse } from '../numerics/linalg';
import { sigmoid } from '../numerics/loss';

/**
 * Largest n·p³ for which Firth fits take true Newton steps on the penalised log-likelihood from the first iteration
 * (firthNewtonHessian costs about n·p³/2 multiply-adds, here under 0.1 ms). Above it a fit starts with the
 * Fisher-type step (X'WX)⁻¹U*, about 2·n·p² per iteration, which converges about as fast wherever the curvature of
 * the penalty ½·log det I is small beside I (many events per coefficient), and switches to Newton steps when it
 * does not (firthNewtonPays): on easy data a fit then costs what it did with Fisher-type steps alone (measured:
 * 24 000 × 20 with profile limits: 6 iterations either way, and Newton steps throughout took 6× as long).
 */
export const FIRTH_NEWTON_FROM_START = 1e5;

/**
 * The rule by which a Firth fit switches from Fisher-type steps to Newton steps for the rest of its iterations:
 * the Fisher-type step converges linearly, and a full step that shrank only by the factor `rate` against the full
 * step before it (largest relative change of a coefficient, this step over the last) predicts ln(1e8)/(−ln rate)
 * more steps to the convergence rule, while Newton needs about 4 steps costing 1 + p/4 Fisher-type steps each.
 * Switch when −ln rate < 18.4/(4 + p) (rate > 0.27 for p = 10, > 0.46 for p = 20). It holds for all n: Newton
 * steps are then the cheaper way to the optimum even where each costs n·p³/2.
 */
export function firthNewtonPays(rate: number, p: number): boolean {
  return rate > 0 && -Math.log(rate) < 18.4 / (4 + p);
}

/** Rows per block: the block's L⁻¹xᵢ and their p(p+1)/2 products (at most 2¹⁸ numbers) stay in cache. */
function blockRows(p: number): number {
  return Math.max(8, Math.min(256, Math.floor(2 ** 18 / ((p * (p + 1)) / 2))));
}

/** Scratch arrays of firthNewtonHessian for one p, reused across iterations. */
export interface FirthHessianWork {
  p: number;
  /** Rows per block (blockRows). */
  rows: number;
  /** Cholesky factor of I (then of the Hessian), L⁻¹ (then a copy of the Hessian), dropped columns. */
  L: Float64Array<ArrayBuffer>;
  Linv: Float64Array<ArrayBuffer>;
  drop: Uint8Array<ArrayBuffer>;
  /** Σ_k: row-major p × p(p+1)/2, the upper triangles of the p matrices Sₖ = L⁻¹IₖL⁻ᵀ. */
  S: Float64Array;
  /** Of one block of rows: zᵢ = L⁻¹xᵢ (p columns), zᵢₐzᵢᵦ (p(p+1)/2 columns), w'ᵢxᵢₖ (p columns), w'ᵢ, qᵢw''ᵢ. */
  z: Float64Array;
  zz: Float64Array;
  d: Float64Array;
  w1: Float64Array;
  g: Float64Array;
}

export function firthHessianWork(p: number): FirthHessianWork {
  const m = (p * (p + 1)) / 2,
    ROWS = blockRows(p);
  return {
    p,
    rows: ROWS,
    L: new Float64Array(p * p),
    Linv: new Float64Array(p * p),
    drop: new Uint8Array(p),
    S: new Float64Array(p * m),
    z: new Float64Array(p * ROWS),
    zz: new Float64Array(m * ROWS),
    d: new Float64Array(p * ROWS),
    w1: new Float64Array(ROWS),
    g: new Float64Array(ROWS),
  };
}

/**
 * Hessian of −ℓ*(β), ℓ*(β) = ℓ(β) + ½·log det I(β), the penalised log-likelihood of Firth's bias reduction for
 * logistic regression (Firth 1993, Biometrika 80:27; Heinze & Schemper 2002, Stat Med 21:2409), for Newton steps.
 *
 * With I = X'WX, wᵢ = cᵢμᵢ(1 − μᵢ) (c the case weights), w' = dw/dη = w(1 − 2μ) and
 * w'' = d²w/dη² = w·[(1 − 2μ)² − 2μ(1 − μ)] (= w(1 − 2μ)² − 2w² only when c = 1):
 *   −∂²ℓ* / ∂βₖ∂βₗ = I[k, l] − ½·[tr(I⁻¹Iₖₗ) − tr(I⁻¹IₗI⁻¹Iₖ)],
 *   Iₖ = X' diag(w'ᵢxᵢₖ) X,  Iₖₗ = X' diag(w''ᵢxᵢₖxᵢₗ) X,
 *   tr(I⁻¹Iₖₗ) = Σᵢ hᵢ[(1 − 2μᵢ)² − 2μᵢ(1 − μᵢ)]xᵢₖxᵢₗ  (hᵢ = wᵢxᵢ'I⁻¹xᵢ, the hat values),
 *   tr(I⁻¹IₗI⁻¹Iₖ) = tr(SₗSₖ),  Sₖ = L⁻¹IₖL⁻ᵀ = Σᵢ w'ᵢxᵢₖ zᵢzᵢ',  zᵢ = L⁻¹xᵢ,  I = LL'.
 * Cost O(n·p³ + p⁴) (see FIRTH_NEWTON_FROM_START), in blocks of rows: no n×p copy. The gradient of ℓ* is the modified
 * score X'(c∘(y − μ) + h∘(½ − μ)).
 *
 * @param X column-major n×p design; `eta` the linear predictor (offset included), `w` = c∘μ(1 − μ), `hat` the hat
 *   values and `info` = X'WX (row-major), all at the same β.
 * @param out receives the p×p Hessian of −ℓ* (row-major; no ridge penalty, nothing fixed).
 * @param fixed 1 for coordinates held fixed (profile likelihood, term tests); the others are the free ones.
 * @returns false, leaving `out` undefined, when I is numerically singular or the Hessian is not positive definite
 *   on the free coordinates (a Cholesky factor drops a column): the caller then takes the Fisher-type step.
 */
export function firthNewtonHessian(
  X: Float64Array,
  n: number,
  p: number,
  eta: Float64Array,
  w: Float64Array,
  hat: Float64Array,
  info: Float64Array,
  out: Float64Array,
  work: FirthHessianWork = firthHessianWork(p),
  fixed?: Uint8Array,
): boolean {
  const ch = cholesky(info, p, 1e-12, work.L, work.drop);
  if (ch.rank < p) return false;
  const Li = choleskyFactorInverse(ch, work.Linv);
  const m = (p * (p + 1)) / 2;
  const { S, z, zz, d, w1, g, rows: ROWS } = work;
  S.fill(0);
  // A = Σᵢ hᵢ[(1 − 2μᵢ)² − 2μᵢ(1 − μᵢ)]xᵢxᵢ' (upper triangle, accumulated in out)
  out.fill(0);
  for (let i0 = 0; i0 < n; i0 += ROWS) {
    const B = Math.min(n, i0 + ROWS) - i0;
    // z columns of the block: z[a·ROWS + r] = (L⁻¹xᵢ)ₐ, i = i0 + r
    z.fill(0);
    for (let a = 0; a < p; a++) {
      const za = a * ROWS;
      for (let j = 0; j <= a; j++) {
        const l = Li[a * p + j],
          xj = j * n + i0;
        if (l !== 0) for (let r = 0; r < B; r++) z[za + r] += l * X[xj + r];
      }
    }
    // w'ᵢ = wᵢ(1 − 2μᵢ) and gᵢ = qᵢw''ᵢ = hᵢ[(1 − 2μᵢ)² − 2μᵢ(1 − μᵢ)]
    for (let r = 0; r < B; r++) {
      const i = i0 + r,
        mu = sigmoid(eta[i]),
        u = 1 - 2 * mu;
      w1[r] = w[i] * u;
      g[r] = hat[i] * (u * u - 2 * mu * (1 - mu));
    }
    for (let k = 0; k < p; k++) {
      const xk = k * n + i0,
        dk = k * ROWS;
      for (let r = 0; r < B; r++) d[dk + r] = w1[r] * X[xk + r];
      for (let l = k; l < p; l++) {
        const xl = l * n + i0;
        let s = 0;
        for (let r = 0; r < B; r++) s += g[r] * X[xk + r] * X[xl + r];
        out[k * p + l] += s;
      }
    }
    // zz[q·ROWS + r] = zᵢₐzᵢᵦ for the q-th pair a ≤ b
    let q = 0;
    for (let a = 0; a < p; a++)
      for (let b = a; b < p; b++, q++) {
        const o = q * ROWS,
          za = a * ROWS,
          zb = b * ROWS;
        for (let r = 0; r < B; r++) zz[o + r] = z[za + r] * z[zb + r];
      }
    // Sₖ[q] += Σ_r d[k, r]·zz[q, r]
    for (let k = 0; k < p; k++) {
      const dk = k * ROWS,
        sk = k * m;
      for (let qq = 0; qq < m; qq++) {
        const o = qq * ROWS;
        let s = 0;
        for (let r = 0; r < B; r++) s += d[dk + r] * zz[o + r];
        S[sk + qq] += s;
      }
    }
  }
  // out = I − ½·(A − B), Bₖₗ = tr(SₖSₗ) = Σ_{a,b} Sₖ[a,b]Sₗ[a,b] (off-diagonal pairs twice)
  for (let k = 0; k < p; k++) {
    for (let l = k; l < p; l++) {
      const sk = k * m,
        sl = l * m;
      let tr = 0,
        q = 0;
      for (let a = 0; a < p; a++) {
        tr += S[sk + q] * S[sl + q];
        q++;
        for (let b = a + 1; b < p; b++, q++) tr += 2 * S[sk + q] * S[sl + q];
      }
      const v = info[k * p + l] - 0.5 * (out[k * p + l] - tr);
      out[k * p + l] = v;
      out[l * p + k] = v;
    }
  }
  // Positive definite on the free coordinates? (ℓ* need not be concave away from its maximum.)
  const Hc = work.Linv;
  Hc.set(out);
  if (fixed)
    for (let j = 0; j < p; j++)
      if (fixed[j])
        for (let k = 0; k < p; k++) {
          Hc[j * p + k] = 0;
          Hc[k * p + j] = 0;
        }
  const hc = cholesky(Hc, p, 1e-12, work.L, work.drop);
  for (let j = 0; j < p; j++) if (hc.dropped[j] && !fixed?.[j]) return false;
  return true;
}
