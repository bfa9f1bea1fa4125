import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core';
import { subgroupsOfAnalysis } from '../../src/engine/subgroups';
import { runAnalysis, scoresOfAnalysis, subgroupStep, type AnalysisRequestInput } from '../../src/engine/workflow';
import { readCsvDataset } from '../engine/fit/helpers';

// birthwt: MASS::birthwt as shipped in tests/fixtures/data (R 4.2.2, MASS 7.3-58.2).
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const request: AnalysisRequestInput = {
  spec: {
    outcome: 'low',
    event: '1',
    terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((column) => ({ type: 'main', column })),
  },
  profile: false,
  termTests: false,
  threshold: 0.3,
};

const withWeights = (d: Dataset): Dataset => ({
  ...d,
  columns: [...d.columns, { kind: 'numeric', name: 'w', values: new Float64Array(d.nRows).fill(2) } as never],
});

describe('subgroupStep: an analysis and the user choice to the SubgroupPerformance record', async () => {
  const { record, scores } = await runAnalysis(birthwt, request);

  it('equals the engine call with the analysis level and cut-off (one path for page, PDF and CLI)', () => {
    // Source: subgroupsOfAnalysis, checked against pROC 1.18.0 in tests/engine/subgroups/analysis.test.ts.
    const got = subgroupStep(birthwt, record, scores, { column: 'race' });
    const direct = subgroupsOfAnalysis(birthwt, scores, { column: 'race' }, { level: 0.95, threshold: 0.3 });
    expect(got).toEqual(direct);
    expect(got.threshold).toBe(0.3);
    expect(got.rows.map((r) => r.n).reduce((a, b) => a + b, 0)).toBe(189);
  });

  it('takes the cut-off the user chose over the request, and null for none', () => {
    expect(subgroupStep(birthwt, record, scores, { column: 'race', threshold: 0.5 }).threshold).toBe(0.5);
    const none = subgroupStep(birthwt, record, scores, { column: 'race', threshold: null });
    expect(none.threshold).toBeNull();
    expect(none.rows[0].atCutoff).toBeNull();
  });

  it('forms bands from cut points and passes on the engine message for bad ones', () => {
    const bands = subgroupStep(birthwt, record, scores, { column: 'age', cutPoints: [20, 25, 30] });
    expect(bands.rows.map((r) => r.label)).toEqual(['< 20', '20 to < 25', '25 to < 30', '≥ 30']);
    expect(() => subgroupStep(birthwt, record, scores, { column: 'age', cutPoints: [30, 20] })).toThrow(
      /increasing order, but 20 comes after 30/,
    );
    expect(() => subgroupStep(birthwt, record, scores, { column: 'race', cutPoints: [2] })).toThrow(/categories/);
  });

  it('rebuilds the same scores from the record as runAnalysis kept, also with a row left out', async () => {
    const again = scoresOfAnalysis(birthwt, record);
    expect(again.rowsUsed).toEqual(scores.rowsUsed);
    expect(again.eta).toEqual(scores.eta);
    expect(again.risk).toEqual(scores.risk);
    const left = await runAnalysis(birthwt, { ...request, leaveOut: [2, 10] });
    const rebuilt = scoresOfAnalysis(birthwt, left.record);
    expect(rebuilt.rowsUsed).toEqual(left.scores.rowsUsed);
    expect(rebuilt.eta).toEqual(left.scores.eta);
    expect(subgroupStep(birthwt, left.record, rebuilt, { column: 'race' })).toEqual(
      subgroupStep(birthwt, left.record, left.scores, { column: 'race' }),
    );
  });

  it('a weighted analysis counts cases: equal to the data written out one row per case', async () => {
    // common practice: a row of weight 2 is two identical cases; the written-out data are the reference
    const data = withWeights(birthwt);
    const w = await runAnalysis(data, { ...request, spec: { ...(request.spec as object), weights: 'w' } as never });
    expect(w.scores.weights).not.toBeNull();
    const doubled: Dataset = {
      nRows: 2 * birthwt.nRows,
      columns: birthwt.columns.map((c) =>
        c.kind === 'numeric'
          ? { ...c, values: Float64Array.from({ length: 2 * birthwt.nRows }, (_, i) => c.values[i >> 1]) }
          : { ...c, codes: Int32Array.from({ length: 2 * birthwt.nRows }, (_, i) => c.codes[i >> 1]) },
      ),
    };
    const one = await runAnalysis(doubled, request);
    const a = subgroupStep(data, w.record, w.scores, { column: 'race' });
    const b = subgroupStep(doubled, one.record, one.scores, { column: 'race' });
    expect(a.rows.map((r) => [r.n, r.events])).toEqual(b.rows.map((r) => [r.n, r.events]));
    expect(a.rows.map((r) => r.auc)).toEqual(b.rows.map((r) => r.auc));
    a.rows.forEach((r, k) => expect(r.calibrationSlope!.estimate).toBeCloseTo(b.rows[k].calibrationSlope!.estimate, 8));
  });

  it('a table of counts (events and trials) gives its subgroups per case', async () => {
    const n = 8;
    const table = {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'infections', values: Float64Array.from([1, 3, 2, 5, 0, 4, 2, 6]) },
        { kind: 'numeric', name: 'operations', values: Float64Array.from([40, 38, 41, 39, 42, 37, 40, 36]) },
        { kind: 'numeric', name: 'month', values: Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8]) },
        { kind: 'categorical', name: 'ward', levels: ['A', 'B'], codes: Int32Array.from([0, 1, 0, 1, 0, 1, 0, 1]) },
      ],
    } as unknown as Dataset;
    const spec = {
      outcome: 'infections',
      layout: { kind: 'events-trials' as const, trials: 'operations' },
      terms: [{ type: 'main' as const, column: 'month' }],
    };
    const g = await runAnalysis(table, { spec, profile: false, termTests: false });
    const perf = subgroupStep(table, g.record, g.scores, { column: 'ward' });
    // ward A: rows 1, 3, 5, 7 → 40 + 41 + 42 + 40 operations, 1 + 2 + 0 + 2 infections (hand count)
    expect(perf.rows.map((r) => [r.label, r.n, r.events])).toEqual([
      ['A', 163, 5],
      ['B', 150, 18],
    ]);
  });
});
