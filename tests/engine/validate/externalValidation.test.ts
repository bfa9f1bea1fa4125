import { describe, expect, it } from 'vitest';
import { externalValidation } from '../../../src/engine/validation/externalValidation';
import { fit } from '../../../src/engine/fitting/fit';
import { fitPipeline } from '../../../src/engine/validation/pipeline';
import { recalibrate, recalibratedModel } from '../../../src/engine/validation/recalibration';
import { PIMA_SPEC, pimaDataset, readFixture, readPima } from './pimaData';

interface RecalFixture {
  devCoef: number[];
  lp: number[];
  citlCoef: number[];
  citlSe: number[];
  citlDeviance: number;
  slopeCoef: number[];
  slopeSe: number[];
  slopeDeviance: number;
  updatedInterceptOnly: number[];
  updatedSlope: number[];
}
// Reference: R 4.2.2 stats::glm (epsilon 1e-14): development fit on MASS::Pima.tr, then on MASS::Pima.te
// glm(y ~ 1, offset = lp) and glm(y ~ lp) (tests/fixtures/reference/glmnet-pima.R → validate-recalibration.json).
const ref = readFixture<RecalFixture>('validate-recalibration.json');
const te = readPima('te');
const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1, Math.abs(b));

describe('recalibrate', () => {
  it(
    'matches R glm(y ~ 1, offset = lp) and glm(y ~ lp) on MASS::Pima.te: estimates 1e-8, SEs 1e-6, deviances ' + '1e-8',
    () => {
      const r = recalibrate(te.y, Float64Array.from(ref.lp));
      const io = r.interceptOnly!,
        is = r.interceptSlope!;
      expect(rel(io.intercept.estimate, ref.citlCoef[0])).toBeLessThan(1e-8);
      expect(rel(io.intercept.se, ref.citlSe[0])).toBeLessThan(1e-6);
      expect(rel(io.deviance, ref.citlDeviance)).toBeLessThan(1e-8);
      expect(io.slope).toBeNull();
      expect(rel(is.intercept.estimate, ref.slopeCoef[0])).toBeLessThan(1e-8);
      expect(rel(is.slope!.estimate, ref.slopeCoef[1])).toBeLessThan(1e-8);
      expect(rel(is.intercept.se, ref.slopeSe[0])).toBeLessThan(1e-6);
      expect(rel(is.slope!.se, ref.slopeSe[1])).toBeLessThan(1e-6);
      expect(rel(is.deviance, ref.slopeDeviance)).toBeLessThan(1e-8);
      expect(is.slope!.lower).toBeLessThan(is.slope!.estimate);
    },
  );

  it('updates the coefficients as a + b·β (intercept) and b·β (others), as computed in R', () => {
    const r = recalibrate(te.y, Float64Array.from(ref.lp));
    const model = {
      recipe: { outcome: 'type', event: 'Yes', terms: [], columnNames: [] },
      coefficients: ref.devCoef.map((estimate, j) => ({ name: j === 0 ? '(Intercept)' : `x${j}`, estimate })),
    };
    const a = recalibratedModel(model, r.interceptOnly!).coefficients.map((c) => c.estimate);
    const b = recalibratedModel(model, r.interceptSlope!).coefficients.map((c) => c.estimate);
    a.forEach((v, j) => expect(rel(v, ref.updatedInterceptOnly[j])).toBeLessThan(1e-8));
    b.forEach((v, j) => expect(rel(v, ref.updatedSlope[j])).toBeLessThan(1e-8));
  });

  it('returns no fits and a warning when the new data hold one outcome class', () => {
    const r = recalibrate(new Float64Array(5), Float64Array.of(0, 1, 2, 3, 4));
    expect(r.interceptOnly).toBeNull();
    expect(r.warnings[0].code).toBe('one-class-only');
  });
});

describe('externalValidation', () => {
  it('scores MASS::Pima.te with a model fitted on Pima.tr as R does, and returns the recalibrated models', () => {
    const model = fit(pimaDataset('tr'), PIMA_SPEC);
    model.coefficients.forEach((c, j) => expect(rel(c.estimate, ref.devCoef[j])).toBeLessThan(1e-6));
    const ev = externalValidation(model, pimaDataset('te'));
    expect(ev.nUsed).toBe(332);
    let worst = 0;
    ev.eta.forEach((e, i) => (worst = Math.max(worst, rel(e, ref.lp[i]))));
    expect(worst).toBeLessThan(1e-6);
    expect(rel(ev.recalibration.interceptSlope!.slope!.estimate, ref.slopeCoef[1])).toBeLessThan(1e-6);
    expect(rel(ev.evaluation.calibration.slope!.estimate, ref.slopeCoef[1])).toBeLessThan(1e-6);
    ev.recalibrated.interceptSlope!.coefficients.forEach((c, j) =>
      expect(rel(c.estimate, ref.updatedSlope[j])).toBeLessThan(1e-6),
    );
    ev.recalibrated.interceptOnly!.coefficients.forEach((c, j) =>
      expect(rel(c.estimate, ref.updatedInterceptOnly[j])).toBeLessThan(1e-6),
    );
    expect(ev.evaluation.auc.auc).toBeGreaterThan(0.5);
  });

  it('accepts a fitted pipeline (lasso at a fixed λ) as the model', async () => {
    const model = await fitPipeline({
      data: pimaDataset('tr'),
      spec: PIMA_SPEC,
      fitOptions: {},
      penalty: { alpha: 1, lambda: 0.03, folds: 5, criterion: 'deviance', nLambda: 100 },
      seed: 1,
    });
    // glmnet 4.1.6 at alpha=1, lambda=0.03 on Pima.tr (glmnet-pima.json "fixed")
    const g = readFixture<{ fixed: { alpha: number; lambda: number; coef: number[] }[] }>(
      'glmnet-pima.json',
    ).fixed.find((f) => f.alpha === 1 && f.lambda === 0.03)!;
    model.coefficients.forEach((c, j) => expect(rel(c.estimate, g.coef[j])).toBeLessThan(1e-6));
    const ev = externalValidation(model, pimaDataset('te'));
    expect(ev.recalibration.interceptSlope!.slope!.estimate).toBeGreaterThan(1); // shrunken model: slope above 1
  });

  it('drops rows with a missing value with a warning, and refuses data without the outcome', () => {
    const model = fit(pimaDataset('tr'), PIMA_SPEC);
    const te2 = pimaDataset('te');
    (te2.columns[1] as { values: Float64Array }).values[4] = NaN;
    const ev = externalValidation(model, te2);
    expect(ev.nUsed).toBe(331);
    expect(ev.warnings.map((w) => w.code)).toContain('rows-dropped');
    const noOutcome = { ...te2, columns: te2.columns.filter((c) => c.name !== 'type') };
    expect(() => externalValidation(model, noOutcome)).toThrow(/no column "type"/);
  });
});

describe('fitPipeline', () => {
  it('reproduces R glm on MASS::Pima.tr for maximum likelihood to 1e-6', async () => {
    const f = await fitPipeline({ data: pimaDataset('tr'), spec: PIMA_SPEC, fitOptions: {}, penalty: null, seed: 1 });
    f.coefficients.forEach((c, j) => expect(rel(c.estimate, ref.devCoef[j])).toBeLessThan(1e-6));
    expect(f.method).toBe('ml');
  });

  it('picks λ by cross-validation and reports the CV record', async () => {
    const f = await fitPipeline({
      data: pimaDataset('tr'),
      spec: PIMA_SPEC,
      fitOptions: {},
      penalty: { alpha: 0.5, lambda: 'cv-min', folds: 5, criterion: 'brier', nLambda: 50 },
      seed: 3,
    });
    expect(f.cv).not.toBeNull();
    expect(f.lambda).toBe(f.cv!.lambdaMin);
    expect(f.coefficients.map((c) => c.estimate)).toEqual(f.cv!.coefficientsMin);
  });
});

describe('fitPipeline ridge', () => {
  it('agrees with glmnet 4.1.6 alpha=0 and with fit(method "ridge") at λ = 0.03 on MASS::Pima.tr', async () => {
    const g = readFixture<{ fixed: { alpha: number; lambda: number; coef: number[] }[] }>(
      'glmnet-pima.json',
    ).fixed.find((f) => f.alpha === 0 && f.lambda === 0.03)!;
    const f = await fitPipeline({
      data: pimaDataset('tr'),
      spec: PIMA_SPEC,
      fitOptions: { method: 'ridge', lambda: 0.03 },
      penalty: null,
      seed: 1,
    });
    const a = fit(pimaDataset('tr'), PIMA_SPEC, { method: 'ridge', lambda: 0.03 });
    f.coefficients.forEach((c, j) => {
      expect(rel(c.estimate, g.coef[j])).toBeLessThan(1e-6);
      expect(rel(c.estimate, a.coefficients[j].estimate)).toBeLessThan(1e-7);
    });
  });
});

describe('records cross the worker boundary', () => {
  it(
    'pipeline, CV, pipeline fit, internal and external validation records survive structuredClone ' + 'unchanged',
    async () => {
      const { bootstrapValidation } = await import('../../../src/engine/validation/bootstrap');
      const pipeline = {
        data: pimaDataset('tr'),
        spec: PIMA_SPEC,
        fitOptions: {},
        penalty: { alpha: 1, lambda: 'cv-1se' as const, folds: 5, criterion: 'deviance' as const, nLambda: 20 },
        seed: 2,
      };
      expect(structuredClone(pipeline)).toEqual(pipeline);
      const f = await fitPipeline(structuredClone(pipeline));
      expect(structuredClone(f)).toEqual(f);
      const b = await bootstrapValidation(pipeline, { B: 2 });
      expect(structuredClone(b)).toEqual(b);
      const ev = externalValidation(f, pimaDataset('te'));
      expect(structuredClone(ev)).toEqual(ev);
    },
  );
});
