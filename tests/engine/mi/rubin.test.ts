import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createRng } from '../../../src/engine/numerics/rng';
import { readFileSync } from 'node:fs';
import { pfUpper } from '../../../src/engine/numerics/distributions';
import { barnardRubinDf, poolCoefficients, poolRubin, poolWaldTest } from '../../../src/engine/imputation/rubin';
import type { FitResult } from '../../../src/engine/core/model';
import { fitRecord } from './helpers';
import { FulcraError } from '../../../src/engine/core/data';

// Fixture: tests/fixtures/reference/mi-pool.R (R 4.2.2, mice 3.15.0 pool() + summary.mipo on glm fits
// to 5 imputations of MASS::birthwt with values removed).
const fx = JSON.parse(readFileSync(new URL('../../fixtures/reference/mi-pool.json', import.meta.url), 'utf8'));

function maxRelErr(a: number[], b: number[]): number {
  return Math.max(...a.map((v, i) => Math.abs(v - b[i]) / Math.max(1, Math.abs(b[i]))));
}

describe('poolRubin', () => {
  const res = poolRubin({ estimates: fx.estimates, variances: fx.variances, dfcom: fx.dfcom, names: fx.terms });
  const col = (k: keyof (typeof res.rows)[number]) => res.rows.map((r) => r[k] as number);

  it('reproduces mice 3.15.0 pool() estimates, within/between/total variance, df, riv, lambda and fmi to 1e-8', () => {
    expect(res.rows.map((r) => r.name)).toEqual(fx.terms);
    expect(maxRelErr(col('estimate'), fx.pool.estimate)).toBeLessThan(1e-8);
    expect(maxRelErr(col('within'), fx.pool.ubar)).toBeLessThan(1e-8);
    expect(maxRelErr(col('between'), fx.pool.b)).toBeLessThan(1e-8);
    expect(maxRelErr(col('total'), fx.pool.t)).toBeLessThan(1e-8);
    expect(maxRelErr(col('dfcom'), fx.pool.dfcom)).toBeLessThan(1e-8);
    expect(maxRelErr(col('df'), fx.pool.df)).toBeLessThan(1e-8);
    expect(maxRelErr(col('riv'), fx.pool.riv)).toBeLessThan(1e-8);
    expect(maxRelErr(col('lambda'), fx.pool.lambda)).toBeLessThan(1e-8);
    expect(maxRelErr(col('fmi'), fx.pool.fmi)).toBeLessThan(1e-8);
    expect(res.warnings).toEqual([]);
  });

  it('reproduces mice 3.15.0 summary(pool(), conf.int = TRUE): se, t statistic, p-value and 95% CI to 1e-8', () => {
    expect(maxRelErr(col('se'), fx.pool.std_error)).toBeLessThan(1e-8);
    expect(maxRelErr(col('statistic'), fx.pool.statistic)).toBeLessThan(1e-8);
    expect(maxRelErr(col('p'), fx.pool.p_value)).toBeLessThan(1e-8);
    expect(maxRelErr(col('lower'), fx.pool.lower)).toBeLessThan(1e-8);
    expect(maxRelErr(col('upper'), fx.pool.upper)).toBeLessThan(1e-8);
  });

  it('reproduces the 90% intervals of summary(pool(), conf.level = 0.90) to 1e-8', () => {
    const r90 = poolRubin({ estimates: fx.estimates, variances: fx.variances, dfcom: fx.dfcom, level: 0.9 });
    expect(
      maxRelErr(
        r90.rows.map((r) => r.lower),
        fx.pool90.lower,
      ),
    ).toBeLessThan(1e-8);
    expect(
      maxRelErr(
        r90.rows.map((r) => r.upper),
        fx.pool90.upper,
      ),
    ).toBeLessThan(1e-8);
  });

  it('reproduces mice 3.15.0 pool(dfcom = Inf), the large-sample Rubin df, to 1e-8', () => {
    const inf = poolRubin({ estimates: fx.estimates, variances: fx.variances, dfcom: Infinity });
    expect(
      maxRelErr(
        inf.rows.map((r) => r.df),
        fx.poolInf.df,
      ),
    ).toBeLessThan(1e-8);
    expect(
      maxRelErr(
        inf.rows.map((r) => r.fmi),
        fx.poolInf.fmi,
      ),
    ).toBeLessThan(1e-8);
    expect(
      maxRelErr(
        inf.rows.map((r) => r.p),
        fx.poolInf.p_value,
      ),
    ).toBeLessThan(1e-8);
    expect(
      maxRelErr(
        inf.rows.map((r) => r.lower),
        fx.poolInf.lower,
      ),
    ).toBeLessThan(1e-8);
  });

  it('gives the complete-data answer when every imputation agrees (b = 0: riv 0, df near dfcom)', () => {
    const r = poolRubin({ estimates: [[1.5], [1.5], [1.5]], variances: [[0.04], [0.04], [0.04]], dfcom: 100 });
    const row = r.rows[0];
    expect(row.between).toBe(0);
    expect(row.total).toBeCloseTo(0.04, 15);
    expect(row.riv).toBe(0);
    // λ is floored at 1e-4 as in mice's barnard.rubin, so df is just below dfcom·(dfcom+1)/(dfcom+3).
    expect(row.df).toBeCloseTo(barnardRubinDf(3, 0, 0.04, 100), 12);
    expect(row.df).toBeLessThan(100);
    expect(row.df).toBeGreaterThan(97);
  });

  it('warns, naming the term, when an imputation has a non-finite estimate', () => {
    const r = poolRubin({
      estimates: [
        [1, NaN],
        [1, 2],
      ],
      variances: [
        [1, 1],
        [1, 1],
      ],
      dfcom: 50,
      names: ['a', 'b'],
    });
    expect(r.warnings.map((w) => w.code)).toEqual(['mi-nonfinite']);
    expect(r.warnings[0].terms).toEqual(['b']);
  });

  it('rejects fewer than two imputations and mismatched inputs', () => {
    expect(() => poolRubin({ estimates: [[1]], variances: [[1]], dfcom: 10 })).toThrow(FulcraError);
    expect(() => poolRubin({ estimates: [[1], [2]], variances: [[1]], dfcom: 10 })).toThrow(/variances/);
    expect(() => poolRubin({ estimates: [[1], [2, 3]], variances: [[1], [1, 1]], dfcom: 10 })).toThrow(/Imputation 2/);
    expect(() => poolRubin({ estimates: [[1], [2]], variances: [[1], [1]], dfcom: 0 })).toThrow(/dfcom/);
  });
});

describe('poolCoefficients', () => {
  const fits = fx.estimates.map((e: number[], k: number) =>
    fitRecord(fx.terms, e, fx.variances[k].map(Math.sqrt), 189),
  );

  it('pools fit records of the 5 birthwt imputations as mice 3.15.0 pool() does, with dfcom = n − rank = 183', () => {
    const r = poolCoefficients(fits);
    expect(r.dfcom).toBe(fx.dfcom);
    expect(r.dfcom).toBe(183);
    const col = (k: 'estimate' | 'se' | 'df' | 'fmi' | 'p' | 'waldLower' | 'waldUpper') =>
      r.coefficients.map((c) => c[k] as number);
    expect(maxRelErr(col('estimate'), fx.pool.estimate)).toBeLessThan(1e-8);
    expect(maxRelErr(col('se'), fx.pool.std_error)).toBeLessThan(1e-8);
    expect(maxRelErr(col('df'), fx.pool.df)).toBeLessThan(1e-8);
    expect(maxRelErr(col('fmi'), fx.pool.fmi)).toBeLessThan(1e-8);
    expect(maxRelErr(col('p'), fx.pool.p_value)).toBeLessThan(1e-8);
    expect(maxRelErr(col('waldLower'), fx.pool.lower)).toBeLessThan(1e-8);
    expect(maxRelErr(col('waldUpper'), fx.pool.upper)).toBeLessThan(1e-8);
    expect(r.coefficients[3].oddsRatio).toBeCloseTo(Math.exp(fx.pool.estimate[3]), 10);
    expect(r.coefficients[3].z).toBe(r.coefficients[3].t);
    expect(r.warnings).toEqual([]);
  });

  it('gives no pooled inference, with a warning, for a coefficient aliased in one imputation', () => {
    const f = fits.map((x: FitResult, k: number) =>
      k === 2
        ? fitRecord(
            fx.terms,
            [...fx.estimates[k].slice(0, 5), 0],
            [...fx.variances[k].slice(0, 5).map(Math.sqrt), null],
            189,
            [false, false, false, false, false, true],
          )
        : x,
    );
    const r = poolCoefficients(f);
    expect(r.coefficients[5].se).toBeNull();
    expect(r.coefficients[5].fmi).toBeNull();
    expect(r.coefficients[0].se).not.toBeNull();
    expect(r.warnings.map((w) => w.code)).toEqual(['mi-aliased']);
    expect(r.warnings[0].terms).toEqual(['smokeyes']);
  });

  it('reports only mean estimates, with a warning, for fits without standard errors (ridge)', () => {
    const f = fx.estimates.map((e: number[]) =>
      fitRecord(
        fx.terms,
        e,
        e.map(() => null),
        189,
      ),
    );
    const r = poolCoefficients(f);
    expect(r.coefficients.every((c) => c.se === null && c.p === null)).toBe(true);
    expect(
      maxRelErr(
        r.coefficients.map((c) => c.estimate),
        fx.pool.estimate,
      ),
    ).toBeLessThan(1e-12);
    expect(r.warnings.map((w) => w.code)).toEqual(['mi-no-inference']);
  });

  it('throws when the fits have different coefficients', () => {
    expect(() => poolCoefficients([fits[0], fitRecord(['a'], [1], [1], 10)])).toThrow(/unlike the first fit/);
  });
});

describe('poolRubin properties', () => {
  const arb = fc.record({
    m: fc.integer({ min: 2, max: 12 }),
    seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
    dfcom: fc.oneof(fc.constant(Infinity), fc.integer({ min: 1, max: 5000 })),
  });
  it(
    'is unchanged by reordering the imputations, keeps lower < estimate < upper, λ in [0, 1), fmi in (0, 1] ' +
      'and df ≤ dfcom (fast-check)',
    () => {
      fc.assert(
        fc.property(arb, ({ m, seed, dfcom }) => {
          const rng = createRng(seed);
          const est = Array.from({ length: m }, () => [rng.normal(), 3 * rng.normal()]);
          const vr = Array.from({ length: m }, () => [0.01 + rng.next(), 0.5 + rng.next()]);
          const a = poolRubin({ estimates: est, variances: vr, dfcom }).rows;
          const b = poolRubin({ estimates: [...est].reverse(), variances: [...vr].reverse(), dfcom }).rows;
          a.forEach((r, j) => {
            expect(b[j].estimate).toBeCloseTo(r.estimate, 12);
            expect(b[j].df).toBeCloseTo(r.df, 8);
            expect(r.lower).toBeLessThan(r.estimate);
            expect(r.upper).toBeGreaterThan(r.estimate);
            expect(r.lambda).toBeGreaterThanOrEqual(0);
            expect(r.lambda).toBeLessThan(1);
            expect(r.fmi).toBeGreaterThan(0);
            expect(r.fmi).toBeLessThanOrEqual(1);
            expect(r.df).toBeGreaterThan(0);
            if (dfcom !== Infinity) expect(r.df).toBeLessThanOrEqual(dfcom);
            expect(r.p).toBeGreaterThanOrEqual(0);
            expect(r.p).toBeLessThanOrEqual(1);
          });
        }),
        { numRuns: 200, seed: 42 },
      );
    },
  );
});

describe('poolWaldTest (D1)', () => {
  // Reference: d1() in tests/fixtures/reference/mi-pool.R — the Li, Raghunathan & Rubin (1991) formulas written out in
  // R 4.2.2 with stats::pf (mice::D1 needs mitml, which is not installed), on the 5 birthwt glm fits.
  const sub = (idx: number[]) => ({
    est: fx.estimates.map((e: number[]) => idx.map((j) => e[j])),
    cov: fx.covariances.map((c: number[]) => idx.flatMap((a) => idx.map((b) => c[a * 6 + b]))),
  });
  for (const [name, idx] of [
    ['race', [3, 4]],
    ['all', [1, 2, 3, 4, 5]],
    ['age', [1]],
  ] as const) {
    it(
      `reproduces D1 statistic, df2, r and p for ${name === 'all' ? 'all five slopes' : `the ${name} term`} to ` +
        `1e-8`,
      () => {
        const { est, cov } = sub([...idx]);
        const r = poolWaldTest(est, cov);
        const [stat, df1, df2, riv, p] = fx.d1[name];
        expect(maxRelErr([r.statistic, r.df1, r.df2, r.riv, r.p], [stat, df1, df2, riv, p])).toBeLessThan(1e-8);
      },
    );
  }

  it('pools term tests inside poolCoefficients from fit covariances (race term = D1 above)', () => {
    const terms = [
      { name: 'age', columns: [1] },
      { name: 'race', columns: [3, 4] },
    ];
    const fits = fx.estimates.map((e: number[], k: number) =>
      fitRecord(fx.terms, e, fx.variances[k].map(Math.sqrt), 189, [], fx.covariances[k], terms),
    );
    const r = poolCoefficients(fits);
    expect(r.terms.map((t) => t.name)).toEqual(['age', 'race']);
    expect(Math.abs((r.terms[1].test?.p as number) - fx.d1.race[4])).toBeLessThan(1e-10);
    const noCov = poolCoefficients(
      fx.estimates.map((e: number[], k: number) =>
        fitRecord(fx.terms, e, fx.variances[k].map(Math.sqrt), 189, [], null, terms),
      ),
    );
    expect(noCov.terms.every((t) => t.test === null)).toBe(true);
  });

  it('refers k·D1 to chi-square when all imputations agree (r = 0)', () => {
    const r = poolWaldTest(
      [
        [1, 2],
        [1, 2],
      ],
      [
        [1, 0, 0, 4],
        [1, 0, 0, 4],
      ],
    );
    expect(r.riv).toBe(0);
    expect(r.df2).toBe(Infinity);
    expect(r.statistic).toBeCloseTo(1, 12); // (1 + 4/4)/2
    expect(r.p).toBeCloseTo(Math.exp(-1), 10); // P(χ²₂ > 2) = e^{-1}
  });
});

describe('pfUpper', () => {
  it('matches R 4.2.2 stats::pf(lower.tail = FALSE) on a grid of x, df1, df2 to 1e-10 relative', () => {
    const g = fx.pf;
    const got = g.x.map((x: number, i: number) => pfUpper(x, g.d1[i], g.d2[i]));
    const err = Math.max(...got.map((v: number, i: number) => Math.abs(v - g.p[i]) / g.p[i]));
    expect(err).toBeLessThan(1e-10);
  });

  it(
    'keeps the digits of a tiny upper tail, and is the χ² limit at df2 = ∞ (R 4.2.2 stats::pf, lower.tail = ' +
      'FALSE)',
    () => {
      expect(Math.abs(pfUpper(50, 3, 1000) / 4.110582339166328e-30 - 1)).toBeLessThan(1e-10);
      // Relative error grows with df2 (cancellation in the beta argument): 8e-13 at 1e5, 2.5e-10 at 1e7 (measured).
      expect(Math.abs(pfUpper(2.5, 4, 1e7) / 0.040427749373991156 - 1)).toBeLessThan(1e-9);
      // pchisq(10, 4, lower.tail = FALSE)
      expect(Math.abs(pfUpper(2.5, 4, Infinity) / 0.040427681994512805 - 1)).toBeLessThan(1e-12);
      expect(pfUpper(0, 2, 5)).toBe(1);
      expect(pfUpper(Infinity, 2, 5)).toBe(0);
      expect(pfUpper(NaN, 2, 5)).toBeNaN();
    },
  );
});
