import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../src/engine/core/model';
import { formatFixed } from '../../src/report/format';
import { createApi } from '../../src/worker/api';
import type { FitRequest } from '../../src/worker/protocol';
import { readCsvDataset } from '../engine/fit/helpers';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-subgroups-report-'));
const pdfPath = (name: string) => join(process.env.FULCRA_PDF_DIR ?? dir, `${name}.pdf`);
/** The PDF's text by pdftotext -layout (poppler-utils), whitespace collapsed. */
const text = (bytes: Uint8Array, name: string) => {
  writeFileSync(pdfPath(name), bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', '-layout', pdfPath(name), '-'], { encoding: 'utf8' }).replace(
    /\s+/g,
    ' ',
  );
};

describe('subgroups through the worker api and in the model-summary PDF', () => {
  // MASS::birthwt as shipped in tests/fixtures/data (R 4.2.2, MASS 7.3-58.2).
  const spec: ModelSpec = {
    outcome: 'low',
    event: '1',
    terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((column) => ({ type: 'main' as const, column })),
  };
  const req: FitRequest = { spec, method: 'ml', level: 0.95, alpha: 1, profile: false };
  const costs = { missedCase: 5, falseAlarm: 1 };

  it('prints the section of the last choice at the report cut-off, and drops it after a new fit', async () => {
    const api = createApi();
    await api.loadDataset(readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']), null, 'birthwt.csv');
    await api.fitModel(req, 'fit');
    const before = text(await api.modelReport(costs, 0.3, '2026-12-04T18:00:00Z', {}), 'no-subgroups');
    expect(before).not.toContain('Performance by subgroup');

    const answer = await api.subgroups({ column: 'race', threshold: 0.3 });
    if (!answer.ok) throw new Error(answer.problem.message);
    expect(await api.subgroupChoice()).toEqual({ column: 'race', threshold: 0.3 });
    const t = text(await api.modelReport(costs, 0.25, '2026-12-04T18:01:00Z', {}), 'subgroups');
    expect(t).toContain('Performance by subgroup');
    expect(t).toContain('within each group of "race" (3 groups, 189 rows used)');
    expect(t).toContain('at the cut-off 0.250'); // the report's cut-off, not the page's earlier one
    const race1 = answer.performance.rows[0];
    expect(t).toContain(formatFixed(race1.auc!.estimate, 3));
    expect(t).toContain('Collins, Ogundimu & Altman 2016');
    expect(t).toContain('Subgroup estimates of "race"');

    await api.fitModel({ ...req, level: 0.9 }, 'refit');
    expect(await api.subgroupChoice()).toBeNull();
    const after = text(await api.modelReport(costs, 0.3, '2026-12-04T18:02:00Z', {}), 'after-refit');
    expect(after).not.toContain('Performance by subgroup');
  }, 60_000);

  it('answers bad cut points with the engine message instead of a result', async () => {
    const api = createApi();
    await api.loadDataset(readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']), null, 'birthwt.csv');
    await api.fitModel(req, 'fit');
    const bad = await api.subgroups({ column: 'age', cutPoints: [30, 20, 40] });
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.problem.code).toBe('bad-cut-points');
      expect(bad.problem.message).toContain('increasing order, but 20 comes after 30');
      expect(bad.problem.suggestion).toContain('20, 30, 40');
    }
    expect(await api.subgroupChoice()).toBeNull();
    const good = await api.subgroups({ column: 'age', cutPoints: [20, 30] });
    expect(good.ok && good.performance.rows.map((r) => r.label)).toEqual(['< 20', '20 to < 30', '≥ 30']);
  }, 60_000);
});
