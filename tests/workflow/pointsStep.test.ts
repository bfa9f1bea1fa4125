import { describe, expect, it } from 'vitest';
import type { Column, Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { generateDemo } from '../../src/engine/demo';
import { pointsAnalysis } from '../../src/engine/points';
import { pointsStep, runAnalysis } from '../../src/engine/workflow';

const ssi = generateDemo('ssi');
const spec: ModelSpec = {
  outcome: 'ssi_30d',
  event: 'yes',
  terms: [
    { type: 'main', column: 'age' },
    { type: 'main', column: 'diabetes', reference: 'no' },
    { type: 'main', column: 'wound_class', reference: 'clean' },
  ],
};

/** The first `n` rows of `data` with the weight column `copies` added. */
function weighted(data: Dataset, n: number, w: (i: number) => number): Dataset {
  const pick = (c: Column): Column =>
    c.kind === 'numeric'
      ? { ...c, values: c.values.slice(0, n) }
      : { ...c, codes: c.codes.slice(0, n), levels: [...c.levels] };
  const copies: Column = { kind: 'numeric', name: 'copies', values: Float64Array.from({ length: n }, (_, i) => w(i)) };
  return { nRows: n, columns: [...data.columns.map(pick), copies] };
}

/** The same rows written out one row per case (row i repeated w(i) times), without the weight column. */
function writtenOut(data: Dataset, n: number, w: (i: number) => number): Dataset {
  const src: number[] = [];
  for (let i = 0; i < n; i++) for (let k = 0; k < w(i); k++) src.push(i);
  const pick = (c: Column): Column =>
    c.kind === 'numeric'
      ? { ...c, values: Float64Array.from(src, (i) => c.values[i]) }
      : { ...c, codes: Int32Array.from(src, (i) => c.codes[i]), levels: [...c.levels] };
  return { nRows: src.length, columns: data.columns.map(pick) };
}

describe('pointsStep (the one path from an analysis to its points score)', () => {
  it('gives what pointsAnalysis gives for the fitted model on the same rows, at the request level', async () => {
    const { record } = await runAnalysis(ssi.dataset, { spec, level: 0.9, profile: false, termTests: false });
    const out = pointsStep(record, ssi.dataset, { baseUnit: { kind: 'per-increase', column: 'age', increase: 10 } });
    const direct = pointsAnalysis(record.fit, ssi.dataset, out.options, { level: 0.9 });
    expect(out.score).toEqual(direct.score);
    expect(out.evaluation).toEqual(direct.evaluation);
    expect(out.evaluation.level).toBe(0.9);
    expect(out.score.baseUnit.rule).toBe('per-increase');
    expect(out.score.baseUnit.logOdds).toBeCloseTo(10 * record.fit.coefficients[1].estimate, 12);
    expect(out.weighted).toBe(false);
    expect(out.cases).toBe(record.fit.nUsed);
    // the score's AUC is a little below the model's (the loss from categorising and rounding is what it shows)
    expect(out.evaluation.model.auc.auc).toBeCloseTo(record.evaluation.auc.auc!, 12);
  });

  it('leaves out the rows the analysis left out', async () => {
    const leaveOut = [2, 3, 4, 10];
    const { record } = await runAnalysis(ssi.dataset, { spec, leaveOut, profile: false, termTests: false });
    const out = pointsStep(record, ssi.dataset);
    expect(out.evaluation.n).toBe(record.fit.nUsed);
    expect(out.evaluation.n).toBe(ssi.dataset.nRows - leaveOut.length - record.fit.nDropped);
  });

  it('with whole-number frequency weights equals the same data written out one row per case', async () => {
    const n = 600;
    const w = (i: number) => 1 + ((i * 7) % 4);
    const req = { profile: false, termTests: false };
    const a = await runAnalysis(weighted(ssi.dataset, n, w), { spec: { ...spec, weights: 'copies' }, ...req });
    const b = await runAnalysis(writtenOut(ssi.dataset, n, w), { spec, ...req });
    for (let j = 0; j < b.record.fit.coefficients.length; j++)
      expect(a.record.fit.coefficients[j].estimate).toBeCloseTo(b.record.fit.coefficients[j].estimate, 8);
    const pa = pointsStep(a.record, weighted(ssi.dataset, n, w));
    const pb = pointsStep(b.record, writtenOut(ssi.dataset, n, w));
    expect(pa.weighted).toBe(true);
    expect(pa.rows).toBe(n);
    expect(pa.cases).toBe(pb.cases);
    expect(pa.score.terms.map((t) => t.categories.map((c) => [c.label, c.points]))).toEqual(
      pb.score.terms.map((t) => t.categories.map((c) => [c.label, c.points])),
    );
    expect(pa.score.table.map((r) => r.total)).toEqual(pb.score.table.map((r) => r.total));
    const ea = pa.evaluation;
    const eb = pb.evaluation;
    expect(ea.n).toBe(eb.n);
    expect(ea.events).toBe(eb.events);
    for (const k of ['points', 'model'] as const) {
      expect(ea[k].auc.auc).toBeCloseTo(eb[k].auc.auc!, 8);
      expect(ea[k].auc.lower).toBeCloseTo(eb[k].auc.lower!, 8);
      expect(ea[k].auc.upper).toBeCloseTo(eb[k].auc.upper!, 8);
      expect(ea[k].brier.brier).toBeCloseTo(eb[k].brier.brier!, 8);
      expect(ea[k].calibration.slope!.estimate).toBeCloseTo(eb[k].calibration.slope!.estimate, 6);
      expect(ea[k].calibration.interceptInTheLarge!.estimate).toBeCloseTo(
        eb[k].calibration.interceptInTheLarge!.estimate,
        6,
      );
    }
    expect(ea.aucDifference.p).toBeCloseTo(eb.aucDifference.p!, 8);
    expect(ea.byTotal.map((r) => [r.n, r.events])).toEqual(eb.byTotal.map((r) => [r.n, r.events]));
  });

  it('names the term of an interaction it cannot score, and a bad base unit', async () => {
    const inter: ModelSpec = {
      ...spec,
      terms: [...spec.terms, { type: 'interaction', columns: ['age', 'diabetes'] }],
    };
    const { record } = await runAnalysis(ssi.dataset, { spec: inter, profile: false, termTests: false });
    expect(() => pointsStep(record, ssi.dataset)).toThrow(/interaction/);
    const plain = await runAnalysis(ssi.dataset, { spec, profile: false, termTests: false });
    expect(() => pointsStep(plain.record, ssi.dataset, { baseUnit: { kind: 'log-odds', value: -1 } })).toThrow(
      /positive finite number; got -1/,
    );
  });
});
