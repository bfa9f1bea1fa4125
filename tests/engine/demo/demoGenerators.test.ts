import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../../src/engine/core/data';
import { generateDemo, generateSealLog, generateSsiRegistry, type DemoScenario } from '../../../src/engine/demo';
import { fit } from '../../../src/engine/fitting/fit';

/** Fits the scenario's own spec and returns, per true coefficient, (estimate − truth) / SE. */
function standardisedErrors(d: DemoScenario): { name: string; z: number }[] {
  const r = fit(d.dataset, d.spec, { profile: false });
  return d.truth.map((t) => {
    const name = t.column === null ? '(Intercept)' : t.level === undefined ? t.column : `${t.column}=${t.level}`;
    const row = r.coefficients.find((c) => c.name === name);
    if (!row || row.se === null) throw new Error(`no coefficient ${name}`);
    return { name, z: (row.estimate - t.value) / row.se };
  });
}

describe('invented demo data', () => {
  it('is labelled as invented in its title or notice', () => {
    for (const id of ['ssi', 'seals'] as const) {
      const d = generateDemo(id);
      expect(`${d.title} ${d.notice}`).toMatch(/fictional|invented/i);
      expect(d.notice).toMatch(/invented/i);
    }
  });

  it('is reproducible for a seed and differs between seeds', () => {
    const a = generateSsiRegistry(300, 7),
      b = generateSsiRegistry(300, 7),
      c = generateSsiRegistry(300, 8);
    expect(a.dataset).toEqual(b.dataset);
    expect(a.dataset).not.toEqual(c.dataset);
  });

  it('has the documented sizes, columns and a few missing values in the registry only', () => {
    const ssi = generateDemo('ssi');
    expect(ssi.dataset.nRows).toBe(2000);
    expect(ssi.dataset.columns.map((c) => c.name)).toEqual([
      'age',
      'bmi',
      'diabetes',
      'asa_class',
      'wound_class',
      'duration_min',
      'prophylaxis',
      'smoker',
      'ssi_30d',
    ]);
    const bmi = ssi.dataset.columns[1];
    const missing = bmi.kind === 'numeric' ? bmi.values.filter(Number.isNaN).length : -1;
    expect(missing).toBeGreaterThan(10);
    expect(missing).toBeLessThan(100);
    const seals = generateDemo('seals');
    expect(seals.dataset.nRows).toBe(5000);
    for (const c of seals.dataset.columns) {
      if (c.kind === 'numeric') expect(c.values.some(Number.isNaN)).toBe(false);
      else expect(c.codes.some((k) => k < 0)).toBe(false);
    }
  });

  // A simulation check (no outside reference needed): with 40,000 rows every fitted coefficient lies within
  // 4 standard errors of the coefficient the data were generated from (seeded, so not flaky).
  it('lets the fitter recover the true SSI coefficients within 4 SE at n = 40,000', () => {
    for (const e of standardisedErrors(generateSsiRegistry(40_000, 11))) expect(Math.abs(e.z), e.name).toBeLessThan(4);
  });

  it('lets the fitter recover the true seal-failure coefficients within 4 SE at n = 40,000', () => {
    for (const e of standardisedErrors(generateSealLog(40_000, 12))) expect(Math.abs(e.z), e.name).toBeLessThan(4);
  });

  it('gives an outcome rate that suits a demo (5–20% events)', () => {
    for (const id of ['ssi', 'seals'] as const) {
      const d = generateDemo(id);
      const y = d.dataset.columns.find((c) => c.name === d.spec.outcome)!;
      const rate = y.kind === 'categorical' ? y.codes.reduce((s, k) => s + k, 0) / d.dataset.nRows : NaN;
      expect(rate).toBeGreaterThan(0.05);
      expect(rate).toBeLessThan(0.2);
    }
  });

  it('rejects an unknown demo or a tiny size with a FulcraError naming the value', () => {
    expect(() => generateDemo('nope' as 'ssi')).toThrow(FulcraError);
    expect(() => generateSsiRegistry(3)).toThrow(/3/);
  });
});
