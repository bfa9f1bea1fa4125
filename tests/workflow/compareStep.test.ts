import { describe, expect, it } from 'vitest';
import type { Dataset, TermSpec } from '../../src/engine/core';
import { compareModels, comparedFromAnalysis } from '../../src/engine/comparison';
import {
  commonRowsRequest,
  compareAnalyses,
  compareWithPredictors,
  resolveRequest,
  runAnalysis,
  scoresOfAnalysis,
  secondModelRequest,
  type AnalysisRequestInput,
} from '../../src/engine/workflow';
import { readCsvDataset, readJson } from '../engine/fit/helpers';

// birthwt: MASS::birthwt as shipped in tests/fixtures/data (R 4.2.2, MASS 7.3-58.2). Reference values:
// tests/fixtures/reference/compare-models.json (R anova(test = "LRT"), pROC 1.18.0 roc.test), see compare-models.R.
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const ref = readJson('tests/fixtures/reference/compare-models.json');

const term = (column: string): TermSpec =>
  column === 'race' ? { type: 'main', column, reference: '1' } : { type: 'main', column };
const request = (columns: string[], extra: Partial<AnalysisRequestInput> = {}): AnalysisRequestInput => ({
  spec: { outcome: 'low', event: '1', terms: columns.map(term) },
  profile: false,
  termTests: false,
  ...extra,
});
const SMALL = ['age', 'lwt', 'race', 'smoke'];
const LARGE = [...SMALL, 'ptl', 'ht', 'ui'];

/** birthwt with `lwt` missing on the first `k` rows (spreadsheet rows 2 … k + 1). */
function withMissingLwt(k: number): Dataset {
  const columns = birthwt.columns.map((c) => {
    if (c.name !== 'lwt' || c.kind !== 'numeric') return c;
    const values = c.values.slice();
    values.fill(NaN, 0, k);
    return { ...c, values };
  });
  return { ...birthwt, columns };
}

describe('compareAnalyses: two kept analyses to the ModelComparison record', async () => {
  const small = await runAnalysis(birthwt, request(SMALL, { threshold: ref.nested.cutoff }));
  const large = await runAnalysis(birthwt, request(LARGE));

  it('equals compareModels on the analyses with the cut-off and costs the user chose', () => {
    const costs = { missedCase: 4, falseAlarm: 1 };
    const got = compareAnalyses(
      birthwt,
      { label: 'Model A', ...small },
      { label: 'Model B', ...large },
      { threshold: ref.nested.cutoff, costs },
    );
    expect(got.status).toBe('compared');
    const direct = compareModels(
      comparedFromAnalysis('Model A', small.record, small.scores),
      comparedFromAnalysis('Model B', large.record, large.scores),
      { threshold: ref.nested.cutoff, costs },
    );
    if (got.status !== 'compared') return;
    expect(got.comparison).toEqual(direct);
    expect(got.comparison.nesting.lrTest!.chi2).toBeCloseTo(ref.nested.lr_chi2, 8); // R anova: Deviance
    expect(got.comparison.nesting.lrTest!.p).toBeCloseTo(ref.nested.lr_p, 10); // R anova: Pr(>Chi)
    expect(got.comparison.reclassification!.threshold).toBe(ref.nested.cutoff);
  });

  it('gives the same record from scores rebuilt from the kept records (what the worker holds)', () => {
    const kept = (label: string, r: typeof small) => ({
      label,
      record: r.record,
      scores: scoresOfAnalysis(birthwt, r.record),
    });
    const fromKept = compareAnalyses(birthwt, kept('A', small), kept('B', large), { threshold: 0.3 });
    const fromRun = compareAnalyses(birthwt, { label: 'A', ...small }, { label: 'B', ...large }, { threshold: 0.3 });
    expect(fromKept).toEqual(fromRun);
  });

  it('refuses models on different rows with the message, the rows and the rows to leave out of both', async () => {
    const data = withMissingLwt(3);
    const a = await runAnalysis(data, request(['age', 'smoke']));
    const b = await runAnalysis(data, request(['age', 'lwt', 'smoke']));
    const got = compareAnalyses(data, { label: 'Model 1', ...a }, { label: 'Model 2', ...b });
    expect(got.status).toBe('different-rows');
    if (got.status !== 'different-rows') return;
    expect(got.message).toContain('Model 1 used 189 rows, Model 2 used 186 rows');
    expect(got.rows).toMatchObject({ usedByA: 189, usedByB: 186, common: 186, onlyA: [2, 3, 4], onlyB: [] });
    expect(got.rows.leaveOut).toEqual([2, 3, 4]);
    expect(got.suggestion).toContain('Refit both models on the 186 common rows');

    // Refitting both with those rows left out makes them comparable, on 186 rows.
    const a2 = await runAnalysis(data, commonRowsRequest(a.record.request, got.rows));
    const b2 = await runAnalysis(data, commonRowsRequest(b.record.request, got.rows));
    const again = compareAnalyses(data, { label: 'Model 1', ...a2 }, { label: 'Model 2', ...b2 });
    expect(again.status).toBe('compared');
    if (again.status === 'compared') expect(again.comparison.n).toBe(186);
  });

  it('keeps the left-out rows a request already had when adding the common-rows ones', () => {
    const r = resolveRequest(request(SMALL, { leaveOut: [50, 7] }));
    expect(commonRowsRequest(r, { leaveOut: [7, 3] }).leaveOut).toEqual([3, 7, 50]);
  });

  it('refuses weighted models with a message that says what to do', async () => {
    const w = {
      ...birthwt,
      columns: [...birthwt.columns, { kind: 'numeric', name: 'w', values: new Float64Array(189).fill(1) } as never],
    };
    const a = await runAnalysis(w, { ...request(SMALL), spec: { ...request(SMALL).spec, weights: 'w' } });
    expect(() => compareAnalyses(w, { label: 'A', ...a }, { label: 'B', ...a })).toThrow(/frequency weights/);
  });
});

describe('secondModelRequest and compareWithPredictors (npm run fit --compare-with)', async () => {
  const main = await runAnalysis(birthwt, request(LARGE, { threshold: 0.3 }));

  it('replaces the terms, keeping the coding of a predictor the main model has', () => {
    const r = secondModelRequest(main.record.request, ['race', 'ftv']);
    expect(r.spec.terms).toEqual([
      { type: 'main', column: 'race', reference: '1' },
      { type: 'main', column: 'ftv' },
    ]);
    expect(r).toMatchObject({ profile: false, termTests: false, validation: null, threshold: 0.3 });
    expect(() => secondModelRequest(main.record.request, ['age', 'age'])).toThrow(/named twice/);
    expect(() => secondModelRequest(main.record.request, ['low'])).toThrow(/is the outcome/);
  });

  it('compares the main model (a) with the second (b): the LR test of R anova when nested', async () => {
    const got = await compareWithPredictors(birthwt, main, SMALL);
    expect(got.refittedOnCommonRows).toBeNull();
    expect(got.outcome.status).toBe('compared');
    if (got.outcome.status !== 'compared') return;
    const c = got.outcome.comparison;
    expect(c.nesting.relation).toBe('b-within-a');
    expect(c.nesting.lrTest!.chi2).toBeCloseTo(ref.nested.lr_chi2, 8); // R anova: Deviance
    expect(c.nesting.lrTest!.df).toBe(ref.nested.lr_df);
    expect([c.a.label, c.b.label]).toEqual(['Model A', 'Model B']);
    expect(c.reclassification!.threshold).toBe(0.3);
  });

  it('refits both on the common rows when the second model uses fewer rows, and says so', async () => {
    const data = withMissingLwt(4);
    const m = await runAnalysis(data, request(['age', 'smoke', 'ht']));
    const got = await compareWithPredictors(data, m, ['age', 'lwt', 'smoke', 'ht']);
    expect(got.refittedOnCommonRows).toMatchObject({ common: 185, leaveOut: [2, 3, 4, 5] });
    expect(got.refittedOnCommonRows!.note).toContain('both were refitted on the 185 rows they share');
    expect(got.outcome.status).toBe('compared');
    if (got.outcome.status === 'compared') {
      expect(got.outcome.comparison.n).toBe(185);
      expect(got.outcome.comparison.nesting.relation).toBe('a-within-b');
    }
  });
});
