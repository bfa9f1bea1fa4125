import { describe, expect, it } from 'vitest';
import { sheetRow } from '../../../src/engine/core/data';
import { subgroupsOfAnalysis } from '../../../src/engine/subgroups';
import { runAnalysis, type AnalysisRequestInput } from '../../../src/engine/workflow';
import { readCsvDataset, readJson } from '../fit/helpers';

// Reference: tests/fixtures/reference/subgroups-proc.json (subgroups-proc.R): R 4.2.2 glm(low ~ age + lwt +
// factor(race) + smoke + ptl + ht + ui, binomial) on MASS::birthwt, then per race group pROC 1.18.0
// roc() / ci.auc(method = "delong") and the qchisq O/E interval. Here Fulcra fits the same model itself.
const ref = readJson('tests/fixtures/reference/subgroups-proc.json');
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const request: AnalysisRequestInput = {
  spec: {
    outcome: 'low',
    event: '1',
    terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((column) =>
      column === 'race' ? { type: 'main', column, reference: '1' } : { type: 'main', column },
    ),
  },
  profile: false,
  termTests: false,
  threshold: ref.cutoff,
};

describe('subgroups of an analysis run by runAnalysis', async () => {
  const { record, scores } = await runAnalysis(birthwt, request);
  const opts = { level: record.request.level, threshold: record.request.threshold };
  const res = subgroupsOfAnalysis(birthwt, scores, { column: 'race' }, opts);

  it("gives pROC's per-race AUC and DeLong CI and R's O/E interval from Fulcra's own fit", () => {
    // pROC 1.18.0 ci.auc(method = "delong"); R qchisq. Tolerance 1e-7: Fulcra's and R's fits differ in the last digits.
    expect(res.rows.map((r) => r.label)).toEqual(['1', '2', '3']);
    res.rows.forEach((row, k) => {
      const r = ref.byRace[k];
      expect(row.n).toBe(r.n);
      expect(Math.abs(row.auc!.estimate - r.auc.estimate)).toBeLessThan(1e-7);
      expect(Math.abs(row.auc!.lower! - r.auc.lower)).toBeLessThan(1e-7);
      expect(Math.abs(row.auc!.upper! - r.auc.upper)).toBeLessThan(1e-7);
      expect(Math.abs(row.observedExpected.upper! - r.oeUpper)).toBeLessThan(1e-7);
    });
  });

  it("gives the overall row the record's own apparent AUC", () => {
    // Source: the same rows and risks as record.evaluation (evaluate.ts), which is checked against pROC elsewhere.
    expect(res.overall.auc!.estimate).toBe(record.evaluation.auc.auc);
  });

  it('follows the used rows when the request leaves a row out', async () => {
    // Source: hand count: the first data row (spreadsheet row 2) is race 2; leaving it out makes that group 25.
    expect(birthwt.columns.find((c) => c.name === 'race')!.kind).toBe('categorical');
    const out = await runAnalysis(birthwt, { ...request, leaveOut: [sheetRow(birthwt, 0)] });
    const sub = subgroupsOfAnalysis(birthwt, out.scores, { column: 'race' }, opts);
    expect(sub.rows.map((r) => r.n)).toEqual([96, 25, 67]);
    expect(sub.overall.n).toBe(188);
  });
});
