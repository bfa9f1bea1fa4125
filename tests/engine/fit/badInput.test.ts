import { describe, expect, it } from 'vitest';
import { FulcraError, type Column, type Dataset } from '../../../src/engine/core/data';
import { fit } from '../../../src/engine/fitting/fit';
import { createRng } from '../../../src/engine/numerics/rng';
import { readCsvDataset } from './helpers';

function dataset(cols: Record<string, (number | string | null)[]>): Dataset {
  const columns: Column[] = Object.entries(cols).map(([name, v]) => {
    if (v.some((x) => typeof x === 'string')) {
      const levels = [...new Set(v.filter((x): x is string => typeof x === 'string'))].sort();
      return {
        kind: 'categorical',
        name,
        levels,
        codes: Int32Array.from(v, (x) => (x === null ? -1 : levels.indexOf(x as string))),
      };
    }
    return { kind: 'numeric', name, values: Float64Array.from(v, (x) => (x === null ? NaN : (x as number))) };
  });
  return { nRows: Object.values(cols)[0].length, columns };
}
const main = (...cs: string[]) => cs.map((column) => ({ type: 'main' as const, column }));
const codeOf = (f: () => unknown) => {
  try {
    f();
  } catch (e) {
    return e instanceof FulcraError ? e.code : 'other';
  }
  return 'none';
};
const finiteEverywhere = (r: ReturnType<typeof fit>) =>
  r.coefficients.every((c) =>
    [c.estimate, c.se, c.z, c.p, c.waldLower, c.waldUpper, c.profileLower, c.profileUpper, c.oddsRatio].every(
      (v) => v === null || Number.isFinite(v),
    ),
  ) &&
  [r.deviance, r.aic, r.bic, r.logLik, r.modelLrChi2, r.modelLrP, r.eventsPerParameter].every(Number.isFinite) &&
  (r.covariance ?? []).every(Number.isFinite);

const x = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
const z = [0.3, -1.2, 0.8, 0.1, -0.5, 1.4, -0.9, 0.2, 0.7, -0.3, 1.1, -1.6];

describe('separation', () => {
  it('warns complete-separation naming the term, with no Inf/NaN anywhere', () => {
    const r = fit(dataset({ y: x.map((v) => +(v > 6)), x, z }), { outcome: 'y', terms: main('x', 'z') });
    const w = r.warnings.find((u) => u.code === 'complete-separation');
    expect(w?.terms).toContain('x');
    expect(w?.suggestion).toMatch(/Firth/);
    expect(r.coefficients[1].se).toBeNull();
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('warns quasi-separation naming NV on brglm2::endometrial (every NV = 1 case is high grade)', () => {
    const d = readCsvDataset('tests/fixtures/data/endometrial.csv');
    const r = fit(d, { outcome: 'HG', terms: main('NV', 'PI', 'EH') });
    const w = r.warnings.find((u) => u.code === 'quasi-separation');
    expect(w?.terms).toEqual(['NV']);
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('names a categorical term with an all-event level and keeps Wald SEs for the other columns', () => {
    const rng = createRng(3);
    const n = 200;
    const ward = Array.from({ length: n }, (_, i) => ['A', 'B', 'C', 'D'][i % 4]);
    const xs = Array.from({ length: n }, () => rng.normal());
    const yy = xs.map((v, i) => (ward[i] === 'D' ? 1 : +(rng.next() < 1 / (1 + Math.exp(-(v - 0.5))))));
    const r = fit(dataset({ y: yy, x: xs, ward }), {
      outcome: 'y',
      terms: [
        { type: 'main', column: 'x' },
        { type: 'main', column: 'ward', reference: 'A' },
      ],
    });
    const w = r.warnings.find((u) => u.code === 'quasi-separation');
    expect(w?.terms).toEqual(['ward']);
    expect(r.coefficients.find((c) => c.name === 'ward=D')!.se).toBeNull();
    expect(r.coefficients.find((c) => c.name === 'x')!.se).toBeGreaterThan(0);
    expect(r.covariance).toBeNull();
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('gives finite Firth estimates on the completely separated data', () => {
    const r = fit(
      dataset({ y: x.map((v) => +(v > 6)), x, z }),
      { outcome: 'y', terms: main('x', 'z') },
      { method: 'firth' },
    );
    expect(r.converged).toBe(true);
    expect(finiteEverywhere(r)).toBe(true);
    expect(r.coefficients[1].profileLower).not.toBeNull();
  });
});

describe('bad input', () => {
  const y = [0, 1, 0, 0, 1, 1, 0, 1, 1, 0, 0, 1];

  it('refuses a single outcome class (one-outcome-class)', () => {
    expect(codeOf(() => fit(dataset({ y: x.map(() => 0), x }), { outcome: 'y', terms: main('x') }))).toBe(
      'one-outcome-class',
    );
    expect(() => fit(dataset({ y: x.map(() => 1), x }), { outcome: 'y', terms: main('x') })).toThrow(/"y"/);
  });

  it('asks for an event level when the outcome has more than two values', () => {
    const out = x.map((v) => ['a', 'b', 'c'][v % 3]);
    expect(codeOf(() => fit(dataset({ out, x }), { outcome: 'out', terms: main('x') }))).toBe('event-level-needed');
    const r = fit(dataset({ out, x }), { outcome: 'out', event: 'b', terms: main('x') }, { profile: false });
    expect(r.events).toBe(4);
  });

  it('refuses a numeric outcome other than 0/1, naming the value', () => {
    expect(() => fit(dataset({ y: x.map((v) => v % 3), x }), { outcome: 'y', terms: main('x') })).toThrow(/value 2/);
  });

  it('says which columns emptied the data when no complete row is left', () => {
    const e = (() => {
      try {
        fit(dataset({ y, x, m: x.map((v) => (v % 2 ? null : 1)), k: x.map((v) => (v % 2 ? 1 : null)) }), {
          outcome: 'y',
          terms: main('x', 'm', 'k'),
        });
      } catch (err) {
        return err as FulcraError;
      }
    })();
    expect(e?.code).toBe('no-complete-rows');
    expect(e?.message).toMatch(/"m" 6/);
  });

  it('drops incomplete rows and counts them per column', () => {
    const m = x.map((v) => (v === 3 || v === 4 ? null : v * 0.5 + (v % 2)));
    const r = fit(dataset({ y, x, m }), { outcome: 'y', terms: main('x', 'm') }, { profile: false });
    expect(r.nUsed).toBe(10);
    expect(r.nDropped).toBe(2);
    expect(r.droppedByColumn).toEqual({ m: 2 });
    expect(r.warnings.map((w) => w.code)).toContain('rows-dropped');
  });

  it('warns few-events when events are fewer than parameters', () => {
    const yy = x.map((v) => +(v === 3 || v === 8));
    const r = fit(
      dataset({ y: yy, x, z, w: x.map((v) => (v * 7) % 5) }),
      { outcome: 'y', terms: main('x', 'z', 'w') },
      { method: 'firth' },
    );
    expect(r.warnings.map((u) => u.code)).toContain('few-events');
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('marks a constant predictor aliased with estimate 0, se null and a warning naming it', () => {
    const r = fit(dataset({ y, x, c: x.map(() => 4) }), { outcome: 'y', terms: main('x', 'c') });
    expect(r.coefficients[2]).toMatchObject({ name: 'c', aliased: true, estimate: 0, se: null });
    expect(r.warnings.find((w) => w.code === 'aliased')?.terms).toEqual(['c']);
    expect(r.terms[1]).toMatchObject({ df: 0, lrChi2: null });
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('marks a predictor that copies another (up to scale) aliased and names both', () => {
    const r = fit(dataset({ y, x, z, x2: x.map((v) => 2 * v + 1) }), { outcome: 'y', terms: main('x', 'z', 'x2') });
    const w = r.warnings.find((u) => u.code === 'aliased')!;
    expect(w.message).toMatch(/"x2" is a copy of "x"/);
    expect(w.terms).toEqual(['x2', 'x']);
    expect(r.coefficients[3].aliased).toBe(true);
    expect(r.coefficients[1].aliased).toBe(false);
  });

  it('throws a FulcraError naming a bad option value', () => {
    const d = dataset({ y, x });
    const spec = { outcome: 'y', terms: main('x') };
    expect(() => fit(d, spec, { level: 95 })).toThrow(/level = 95/);
    expect(() => fit(d, spec, { method: 'lasso' as never })).toThrow(/method = "lasso"/);
    expect(() => fit(d, spec, { method: 'ridge' })).toThrow(/lambda > 0/);
    expect(() => fit(d, spec, { maxIter: 2.5 })).toThrow(/maxIter = 2.5/);
    expect(() => fit(d, spec, { tolerance: 1 } as never)).toThrow(/Unknown fit option "tolerance"/);
  });

  it('names an unknown column and an unknown reference level', () => {
    expect(() => fit(dataset({ y, x }), { outcome: 'y', terms: main('age') })).toThrow(/no column named "age"/);
    const g = x.map((v) => ['u', 'v'][v % 2]);
    expect(
      codeOf(() => fit(dataset({ y, g }), { outcome: 'y', terms: [{ type: 'main', column: 'g', reference: 'w' }] })),
    ).toBe('unknown-reference');
  });

  it('reports non-convergence as a warning when the iteration cap is too small', () => {
    const r = fit(dataset({ y, x, z }), { outcome: 'y', terms: main('x', 'z') }, { maxIter: 1, profile: false });
    expect(r.converged).toBe(false);
    expect(r.warnings.map((w) => w.code)).toContain('not-converged');
  });
});

describe('options', () => {
  it('skips the per-term likelihood-ratio tests when termTests is false', () => {
    const y = [0, 1, 0, 0, 1, 1, 0, 1, 1, 0, 0, 1];
    const r = fit(dataset({ y, x, z }), { outcome: 'y', terms: main('x', 'z') }, { termTests: false, profile: false });
    expect(r.terms.every((t) => t.lrChi2 === null && t.lrP === null)).toBe(true);
    expect(r.coefficients[1].se).not.toBeNull();
  });
});

describe('extreme scales', () => {
  const y = [0, 1, 0, 0, 1, 1, 0, 1, 1, 0, 0, 1];
  const base = fit(dataset({ y, x, z }), { outcome: 'y', terms: main('x', 'z') }, { profile: false });

  it('gives the same fit for a predictor in units of 1e300 or 1e-170 (coefficient scaled back)', () => {
    for (const c of [1e300, 1e-170]) {
      const r = fit(
        dataset({ y, x: x.map((v) => v * c), z }),
        { outcome: 'y', terms: main('x', 'z') },
        { profile: false },
      );
      expect(r.coefficients[1].aliased).toBe(false);
      expect(r.coefficients[1].estimate * c).toBeCloseTo(base.coefficients[1].estimate, 8);
      expect(r.coefficients[0].estimate).toBeCloseTo(base.coefficients[0].estimate, 8);
      expect(finiteEverywhere(r)).toBe(true);
    }
  });

  it('keeps the intercept finite next to a constant predictor of 1e307', () => {
    const r = fit(
      dataset({ y, x, c: x.map(() => 1e307) }),
      { outcome: 'y', terms: main('x', 'c') },
      { profile: false },
    );
    expect(r.coefficients[2].aliased).toBe(true);
    expect(finiteEverywhere(r)).toBe(true);
  });

  it('fits a spline of a predictor in units of 1e150 like one in ordinary units', () => {
    const spec = (col: string) => ({
      outcome: 'y',
      terms: [{ type: 'spline' as const, column: col, knots: 3 as const }],
    });
    const a = fit(dataset({ y, x }), spec('x'), { profile: false });
    const b = fit(dataset({ y, x: x.map((v) => v * 1e150) }), spec('x'), { profile: false });
    expect(b.deviance).toBeCloseTo(a.deviance, 8);
    expect(finiteEverywhere(b)).toBe(true);
  });

  it('refuses a design column that overflows (design-overflow) naming the term', () => {
    const big = x.map((v) => 1e300 * v);
    expect(() =>
      fit(dataset({ y, x: big, z: z.map((v) => 1e9 * v) }), {
        outcome: 'y',
        terms: [...main('x', 'z'), { type: 'interaction', columns: ['x', 'z'] }],
      }),
    ).toThrow(/"x:z"/);
  });
});
