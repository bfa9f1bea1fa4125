import { describe, expect, it } from 'vitest';
import { coxSnellR2, maxCoxSnellR2, riley2020SampleSize } from '../../../src/engine/evaluation/sampleSize';

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

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
    expect(short.criteria.map((c) => c.met)).toEqual([false, false, true]);
    expect(short.summary.at(-1)).toBe(
      'Your data (500 cases, 87 events, 3.6 per parameter) meet criterion (iii) but not (i) or (ii): ' +
        'expect over-fitting; shrink the coefficients (a penalised fit) or use fewer parameters.',
    );
    const enough = riley2020SampleSize({
      parameters: 24,
      outcomeProportion: 0.174,
      r2cs: 0.288,
      actual: { n: 700, events: 122 },
    });
    expect(enough.actual!.enough).toBe(true);
    expect(enough.criteria.map((c) => c.met)).toEqual([true, true, true]);
    expect(enough.summary.at(-1)).toMatch(/meet all three criteria\.$/);
    expect(riley2020SampleSize({ parameters: 24, outcomeProportion: 0.174, r2cs: 0.288 }).criteria[0].met).toBeNull();
  });

  // R 4.2.2: glm(case ~ age + parity + education + induced + spontaneous, binomial, datasets::infert)
  // (248 rows, 83 cases, 6 coefficients besides the intercept) has deviance 257.79769020552897 and null deviance
  // 316.17111081640439; Riley's formulas (as in R by hand) give (i) 227, (ii) 146, (iii) 343.
  const infert = {
    parameters: 6,
    outcomeProportion: 83 / 248,
    fitted: { deviance: 257.79769020552897, nullDeviance: 316.17111081640439, n: 248 },
  };
  const OVERFIT_I =
    'Expect over-fitting: predictions too extreme (expected shrinkage below 0.9); ' +
    'shrink the coefficients (a penalised fit) or use fewer parameters.';
  const IMPRECISE =
    "The overall risk (intercept) is imprecise: the model's average risk may be off by more than ±0.05.";

  it('on infert, where only (iii) fails, says the overall risk is imprecise, not that the model is over-fitted', () => {
    const r = riley2020SampleSize({ ...infert, actual: { n: 248, events: 83 } });
    expect(r.criteria.map((c) => c.n)).toEqual([227, 146, 343]);
    expect(r.criteria.map((c) => c.met)).toEqual([true, true, false]);
    expect(r.criteria.map((c) => c.concerns)).toEqual(['overfitting', 'overfitting', 'overall-risk']);
    expect(r.criteria[2].consequence).toBe(IMPRECISE);
    expect(r.criteria[2].text).toMatch(
      new RegExp(`Not met by your 248 cases \\(83 events\\)\\. ${escape(IMPRECISE)}$`),
    );
    expect(r.criteria[0].text).toMatch(/Met by your 248 cases \(83 events\)\.$/);
    expect(r.summary.at(-1)).toBe(
      'Your data (248 cases, 83 events, 13.8 per parameter) meet criteria (i) and (ii), which guard against ' +
        "over-fitting, but not (iii): the overall risk (intercept) is imprecise: the model's average risk may be " +
        'off by more than ±0.05.',
    );
    expect(r.summary.join('\n')).not.toMatch(/expect over-fitting|over-fitted/i);
  });

  it('when only (i) fails, says to expect over-fitting and names shrinkage or fewer parameters', () => {
    // The infert model with a margin of ±0.1 for (iii) (86 cases) and 200 rows: only (i) (227) is not met.
    const r = riley2020SampleSize({ ...infert, margin: 0.1, actual: { n: 200, events: 67 } });
    expect(r.criteria.map((c) => c.n)).toEqual([227, 146, 86]);
    expect(r.criteria.map((c) => c.met)).toEqual([false, true, true]);
    expect(r.criteria[0].consequence).toBe(OVERFIT_I);
    expect(r.criteria[0].text).toMatch(
      new RegExp(`Not met by your 200 cases \\(67 events\\)\\. ${escape(OVERFIT_I)}$`),
    );
    expect(r.summary.at(-1)).toBe(
      'Your data (200 cases, 67 events, 11.2 per parameter) meet criteria (ii) and (iii) but not (i): ' +
        'expect over-fitting; shrink the coefficients (a penalised fit) or use fewer parameters.',
    );
    expect(r.summary.join('\n')).not.toMatch(/imprecise/);
  });

  it('names both consequences when the over-fitting criteria and (iii) all fail', () => {
    const r = riley2020SampleSize({ ...infert, actual: { n: 120, events: 40 } });
    expect(r.criteria.map((c) => c.met)).toEqual([false, false, false]);
    expect(r.summary.at(-1)).toBe(
      'Your data (120 cases, 40 events, 6.7 per parameter) meet none of (i), (ii) or (iii): expect over-fitting; ' +
        'shrink the coefficients (a penalised fit) or use fewer parameters. Also, the overall risk (intercept) is ' +
        "imprecise: the model's average risk may be off by more than ±0.05.",
    );
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
