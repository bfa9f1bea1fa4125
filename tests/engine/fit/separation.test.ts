import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Dataset } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { createRng } from '../../../src/engine/numerics/rng';
import { readCsvDataset, readJson } from './helpers';

const main = (...cs: string[]) => cs.map((column) => ({ type: 'main' as const, column }));
const num = (name: string, v: ArrayLike<number>) => ({ kind: 'numeric' as const, name, values: Float64Array.from(v) });

// Reference: tests/fixtures/reference/separation-toy.json from separation-toy.R — R 4.2.2 stats, glm(y ~ x + z,
// binomial) and drop1(test = "LRT") on a 12-row toy where x separates y completely (limiting statistics).
const ref = readJson('tests/fixtures/reference/separation-toy.json');

describe('complete separation: the 12-row toy against R glm + drop1', () => {
  const data = readCsvDataset('tests/fixtures/data/separation-toy.csv');
  const r = fit(data, { outcome: 'y', terms: main('x', 'z') });

  it('gives the limiting deviance and drop1 likelihood-ratio statistics to 1e-6', () => {
    expect(r.converged).toBe(false);
    expect(r.nullDeviance).toBeCloseTo(ref.null_deviance, 10);
    expect(Math.abs(r.deviance - ref.deviance)).toBeLessThan(1e-6);
    expect(r.terms.map((t) => t.name)).toEqual(ref.drop1_terms);
    r.terms.forEach((t, k) => expect(Math.abs(t.lrChi2! - ref.drop1_lrt[k])).toBeLessThan(1e-6));
    expect(Math.abs(r.modelLrChi2! - ref.null_deviance)).toBeLessThan(1e-6);
  });

  it('names every diverging coefficient, the intercept included, and withholds all Wald output', () => {
    const w = r.warnings.find((u) => u.code === 'complete-separation')!;
    expect(w.message).toContain('"(Intercept)", "x", "z"');
    expect(w.terms).toEqual(['(Intercept)', 'x', 'z']);
    for (const c of r.coefficients)
      expect([c.se, c.z, c.p, c.waldLower, c.waldUpper]).toEqual([null, null, null, null, null]);
    expect(r.covariance).toBeNull();
  });

  it('gives unbounded profile limits on the divergent side, roots of the profile deviance on the other', () => {
    const [b0, x, z] = r.coefficients;
    expect([b0.profileLowerUnbounded, b0.profileUpperUnbounded, b0.profileLower]).toEqual([true, false, null]);
    expect([x.profileLowerUnbounded, x.profileUpperUnbounded, x.profileUpper]).toEqual([false, true, null]);
    // x alone separates, so z's profile is flat at the limit: unbounded both ways
    expect([z.profileLowerUnbounded, z.profileUpperUnbounded, z.profileLower, z.profileUpper]).toEqual([
      true,
      true,
      null,
      null,
    ]);
    // The finite limits are roots of the profile deviance at χ²₁(0.95) = 3.841459: checked in R 4.2.2, where
    // glm(y ~ z + offset(1.0825638100 * x)) and glm(y ~ 0 + x + z + offset(rep(-3.8356738440, 12))) both have
    // deviance 3.8414588207 (the full model's limiting deviance is 0).
    expect(x.profileLower!).toBeCloseTo(1.08256381, 7);
    expect(b0.profileUpper!).toBeCloseTo(-3.83567384, 7);
  });
});

// The same x and z with y = (x > 6): 5 events in 12, where a refit warm-started from the diverged estimate stuck on
// the wrong side (LR 664 for x). Reference: separation-toy.json `five_events` (R 4.2.2 glm + drop1(test = "LRT")).
describe('complete separation with 5 events in 12: the reduced refit is taken to its own limit', () => {
  const toy = readCsvDataset('tests/fixtures/data/separation-toy.csv');
  const xs = (toy.columns.find((c) => c.name === 'x') as { values: Float64Array }).values;
  const data: Dataset = {
    nRows: 12,
    columns: [
      ...toy.columns.filter((c) => c.name !== 'y'),
      num(
        'y',
        Array.from(xs, (v) => +(v > 6)),
      ),
    ],
  };
  const r = fit(data, { outcome: 'y', terms: main('x', 'z') });

  it("matches R's drop1 to 1e-6, and no statistic exceeds the null deviance", () => {
    const five = ref.five_events;
    expect(r.nullDeviance).toBeCloseTo(five.null_deviance, 9);
    five.drop1_lrt.forEach((v: number, k: number) => expect(Math.abs(r.terms[k].lrChi2! - v)).toBeLessThan(1e-6));
    expect(r.modelLrChi2!).toBeLessThanOrEqual(r.nullDeviance);
  });

  it('withholds the Wald output of the diverging intercept', () => {
    expect(r.coefficients[0].se).toBeNull();
    expect(r.warnings.find((w) => w.code === 'complete-separation')!.terms).toContain('(Intercept)');
  });
});

// Reference: separation-toy.json `endometrial` (R 4.2.2 glm with epsilon 1e-14, drop1(test = "LRT")). The profile
// roots were checked by hand in R 4.2.2 by refits with the coefficient as an offset (deviance 3.841459 above).
describe('quasi-complete separation on brglm2::endometrial (NV = 1 only in high-grade cases)', () => {
  const r = fit(readCsvDataset('tests/fixtures/data/endometrial.csv'), {
    outcome: 'HG',
    terms: main('NV', 'PI', 'EH'),
  });

  it('treats only NV as diverging: the intercept, PI and EH keep Wald and two finite profile limits', () => {
    const w = r.warnings.find((u) => u.code === 'quasi-separation')!;
    expect(w.terms).toEqual(['NV']);
    expect(w.message).not.toContain('(Intercept)');
    const [b0, nv, pi, eh] = r.coefficients;
    expect(nv.se).toBeNull();
    expect([nv.profileLowerUnbounded, nv.profileUpperUnbounded]).toEqual([false, true]);
    expect(nv.profileLower!).toBeCloseTo(1.28411179, 6);
    for (const c of [b0, pi, eh]) {
      expect(c.se).toBeGreaterThan(0);
      expect([c.profileLowerUnbounded, c.profileUpperUnbounded]).toEqual([false, false]);
      expect(c.profileLower! < c.estimate && c.estimate < c.profileUpper!).toBe(true);
    }
    expect(pi.profileLower!).toBeCloseTo(-0.1370768, 6);
    expect(eh.profileUpper!).toBeCloseTo(-1.43638899, 6);
    expect(b0.profileLower!).toBeCloseTo(1.43274582, 6);
  });

  it("matches R's limiting drop1 statistics and deviance to 1e-6", () => {
    expect(Math.abs(r.deviance - ref.endometrial.deviance)).toBeLessThan(1e-6);
    ref.endometrial.drop1_lrt.forEach((v: number, k: number) =>
      expect(Math.abs(r.terms[k].lrChi2! - v)).toBeLessThan(1e-6),
    );
  });
});

/** n rows, x separating y at a random cut (complete) or with ties at the cut (quasi), z and w noise. */
function separated(seed: number, n: number, quasi: boolean): Dataset {
  const rng = createRng(seed);
  const x = Array.from({ length: n }, () => Math.round(rng.next() * 40) / 4);
  const z = Array.from({ length: n }, () => rng.normal() * 2 + 5);
  const w = Array.from({ length: n }, () => Math.round(rng.next() * 3));
  const cut = x.slice().sort((a, b) => a - b)[Math.max(1, Math.floor(rng.next() * (n - 1)))];
  const y = x.map((v, i) => (v > cut ? 1 : v < cut ? 0 : quasi ? +(i % 2 === 0) : 0));
  return { nRows: n, columns: [num('y', y), num('x', x), num('z', z), num('w', w)] };
}

describe('limiting likelihood-ratio tests on random separated data', () => {
  it('never gives a term or model statistic above the null deviance (complete and quasi-complete)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 8, max: 40 }), fc.boolean(), (seed, n, q) => {
        const d = separated(seed, n, q);
        const ys = d.columns[0].kind === 'numeric' ? d.columns[0].values : new Float64Array();
        const events = ys.reduce((a, b) => a + b, 0);
        if (events === 0 || events === n) return;
        const r = fit(d, { outcome: 'y', terms: main('x', 'z', 'w') }, { profile: false });
        const bound = r.nullDeviance * (1 + 1e-12) + 1e-9;
        expect(r.deviance).toBeGreaterThanOrEqual(0);
        expect(r.modelLrChi2!).toBeLessThanOrEqual(bound);
        for (const t of r.terms) {
          expect(t.lrChi2!).toBeGreaterThanOrEqual(0);
          expect(t.lrChi2!).toBeLessThanOrEqual(bound);
        }
      }),
      { numRuns: 60, seed: 13 },
    );
  });
});

// Reference: firth-endometrial.json and firth-biopsy.json (brglm2 0.9 on R 4.2.2, AS_mean), penalised_loglik =
// ℓ + ½·log det X'WX at the estimate on the original design.
describe('Firth records name the likelihood of their tests', () => {
  it('carries the penalised log-likelihood of brglm2 and marks the LR tests as penalised', () => {
    const endo = readJson('tests/fixtures/reference/firth-endometrial.json');
    const r = fit(
      readCsvDataset('tests/fixtures/data/endometrial.csv'),
      { outcome: 'HG', terms: main('NV', 'PI', 'EH') },
      {
        method: 'firth',
        profile: false,
      },
    );
    expect(r.testLikelihood).toBe('penalised');
    expect(r.penalisedLogLik!).toBeCloseTo(endo.penalised_loglik, 8);
    expect(r.logLik).toBeLessThan(r.penalisedLogLik! + 50);

    const bio = readJson('tests/fixtures/reference/firth-biopsy.json');
    const data = readCsvDataset('tests/fixtures/data/biopsy.csv', ['class']);
    const V = Array.from({ length: 9 }, (_, k) => `V${k + 1}`);
    const b = fit(
      data,
      { outcome: 'class', event: 'malignant', terms: main(...V) },
      {
        method: 'firth',
        profile: false,
        termTests: false,
      },
    );
    expect(b.penalisedLogLik!).toBeCloseTo(bio.penalised_loglik, 7);
  });

  it('marks ML tests as ordinary and carries no penalised log-likelihood', () => {
    const r = fit(readCsvDataset('tests/fixtures/data/endometrial.csv'), { outcome: 'HG', terms: main('PI', 'EH') });
    expect(r.testLikelihood).toBe('ordinary');
    expect(r.penalisedLogLik).toBeNull();
    expect(r.modelLrChi2!).toBeCloseTo(r.nullDeviance - r.deviance, 10);
  });
});

describe('quasi-complete separation by a rare 0/1 column', () => {
  it('is detected although the standardised coefficient of a column with a small SD moves slowly', () => {
    const rng = createRng(5);
    const n = 3000;
    const x = Array.from({ length: n }, () => rng.normal());
    const flag = Array.from({ length: n }, () => +(rng.next() < 0.01));
    const y = x.map((v, i) => (flag[i] ? 1 : +(rng.next() < 1 / (1 + Math.exp(1 - v)))));
    const d: Dataset = { nRows: n, columns: [num('y', y), num('x', x), num('flag', flag)] };
    const r = fit(d, { outcome: 'y', terms: main('x', 'flag') });
    const w = r.warnings.find((u) => u.code === 'quasi-separation');
    expect(w?.terms).toEqual(['flag']);
    expect(r.warnings.map((u) => u.code)).not.toContain('not-converged');
    const f = r.coefficients[2];
    expect([f.se, f.profileUpper, f.profileUpperUnbounded]).toEqual([null, null, true]);
    expect(f.profileLower).toBeGreaterThan(0);
  });
});
