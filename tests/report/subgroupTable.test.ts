import { describe, expect, it } from 'vitest';
import { forestData } from '../../src/engine/subgroups';
import { runAnalysis, subgroupStep } from '../../src/engine/workflow';
import { subgroupsCsv } from '../../src/io/export/subgroupsCsv';
import { forestDomain, subgroupTableText } from '../../src/report/subgroupTable';
import { parseCutPoints } from '../../src/ui/panels/SubgroupPanel';
import { readCsvDataset } from '../engine/fit/helpers';

// MASS::birthwt as shipped in tests/fixtures/data (R 4.2.2, MASS 7.3-58.2).
const birthwt = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);

describe('the subgroup table as text, CSV and forest-plot ranges', async () => {
  const { record, scores } = await runAnalysis(birthwt, {
    spec: { outcome: 'low', event: '1', terms: ['age', 'lwt', 'smoke'].map((column) => ({ type: 'main', column })) },
    profile: false,
    termTests: false,
  });
  // Ages 35 and over: 5 mothers, none with a low birth weight (count of birthwt.csv): a one-class band.
  const perf = subgroupStep(birthwt, record, scores, { column: 'age', cutPoints: [25, 35], threshold: 0.3 });

  it('writes one line per group and the all-rows line, with a dash where a measure was not computed', () => {
    const { header, rows } = subgroupTableText(perf);
    expect(header.slice(-3)).toEqual(['Sensitivity at 0.300', 'Specificity at 0.300', 'Flagged at 0.300']);
    expect(rows.map((r) => r[0])).toEqual(['< 25', '25 to < 35', '≥ 35', 'All rows']);
    const old = rows[2];
    expect(old.slice(1, 3)).toEqual(['5', '0']);
    expect(old[4]).toBe('—');
    const auc = perf.rows[0].auc!;
    expect(rows[0][4]).toBe(`${auc.estimate.toFixed(3)} (${auc.lower!.toFixed(3)} to ${auc.upper!.toFixed(3)})`);
  });

  it('gives the CSV numbers at full precision, empty cells where not computed, labels made safe', () => {
    const lines = subgroupsCsv(perf).trimEnd().split('\r\n');
    expect(lines).toHaveLength(5);
    const head = lines[0].split(',');
    const cells = lines[1].split(',');
    expect(cells[head.indexOf('AUC')]).toBe(String(perf.rows[0].auc!.estimate));
    expect(lines[3].split(',')[head.indexOf('AUC')]).toBe('');
    const hostile = { ...perf, column: '=cmd()', rows: perf.rows.map((r) => ({ ...r, label: '@SUM(A1)' })) };
    expect(subgroupsCsv(hostile).split('\r\n')[1].startsWith("'=cmd(),'@SUM(A1),")).toBe(true);
  });

  it('keeps forest ranges finite: the log scale skips an O/E of 0, AUC stays within [0, 1]', () => {
    const oe = forestData(perf, 'observedExpected');
    const withZero = { ...oe, rows: [{ ...oe.rows[0], estimate: 0, lower: 0, upper: 1.5 }, ...oe.rows.slice(1)] };
    const [lo, hi] = forestDomain(withZero);
    expect(lo).toBeGreaterThan(0);
    expect(hi).toBeGreaterThanOrEqual(1.5);
    const [alo, ahi] = forestDomain(forestData(perf, 'auc'));
    expect(alo).toBeGreaterThanOrEqual(0);
    expect(ahi).toBeLessThanOrEqual(1);
  });

  it('reads typed cut points and names a token that is not a number', () => {
    expect(parseCutPoints(' 40, 60;80 ')).toEqual({ cuts: [40, 60, 80] });
    expect(parseCutPoints('')).toEqual({ cuts: [] });
    expect(parseCutPoints('40, sixty')).toEqual({
      problem: expect.objectContaining({ message: '“sixty” in the cut points is not a number.' }),
    });
  });
});
