import { describe, expect, it } from 'vitest';
import { coxSnellR2, maxCoxSnellR2, riley2020SampleSize } from '../../../src/engine/evaluation/sampleSize';

describe('Riley et al. 2020 sample size', () => {
  it(
    "reproduces the paper's worked example: 24 parameters, proportion 0.174, R²cs 0.288 → 623, 662, 221, n = " +
      '662 (Riley et al. 2020, BMJ 368:m441)',
    () => {
      const r = riley2020SampleSize({ parameters: 24, outcomeProportion: 0.174, r2cs: 0.288 });
      expect(r.criteria.map((c) => c.n)).toEqual([623, 662, 221]);
      expect(r.requiredN).toBe(662);
      expect(r.binding).toBe('ii');
      expect(r.requiredEvents).toBe(Math.ceil(662 * 0.174));
      expect(r.summary[0]).toMatch(/at least 662 cases/);
      expect(r.warnings).toEqual([]);
    },
  );
  it('says whether the data at hand are enough', () => {
    const short = riley2020SampleSize({
      parameters: 24,
      outcomeProportion: 0.174,
      r2cs: 0.288,
      actual: { n: 500, events: 87 },
    });
    expect(short.actual!.enough).toBe(false);
    expect(short.summary.at(-1)).toMatch(/fall short/);
    expect(
      riley2020SampleSize({ parameters: 24, outcomeProportion: 0.174, r2cs: 0.288, actual: { n: 700, events: 122 } })
        .actual!.enough,
    ).toBe(true);
  });
  it('assumes 15% of the maximum R²cs with a warning when none is given', () => {
    const r = riley2020SampleSize({ parameters: 10, outcomeProportion: 0.1 });
    expect(r.r2cs).toBeCloseTo(0.15 * maxCoxSnellR2(0.1), 15);
    expect(r.warnings.map((w) => w.code)).toEqual(['r2-assumed']);
  });
  it('computes R²cs of a fitted model as 1 − exp((D_model − D_null)/n), between 0 and 1', () => {
    expect(coxSnellR2(200, 250, 300)).toBeCloseTo(1 - Math.exp(-50 / 300), 15);
    expect(() => coxSnellR2(260, 250, 300)).toThrow(/null deviance/);
  });
  it('takes R²cs from a fitted model when asked, with a warning that it is the apparent (optimistic) value', () => {
    const r = riley2020SampleSize({
      parameters: 8,
      outcomeProportion: 0.3,
      fitted: { deviance: 220, nullDeviance: 260, n: 250 },
    });
    expect(r.r2cs).toBeCloseTo(1 - Math.exp(-40 / 250), 15);
    expect(r.r2csSource).toBe('fitted-model');
    expect(r.warnings.map((w) => w.code)).toEqual(['r2-apparent']);
  });
  it('rejects an R²cs above its maximum for the outcome proportion', () => {
    expect(() => riley2020SampleSize({ parameters: 5, outcomeProportion: 0.05, r2cs: 0.5 })).toThrow(/maximum/);
  });
});
