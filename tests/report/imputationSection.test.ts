import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../src/engine/core/model';
import { createApi } from '../../src/worker/api';
import type { FitRequest } from '../../src/worker/protocol';
import { birthwtIncomplete } from '../engine/mi/helpers';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-mi-report-'));
const text = (bytes: Uint8Array, name: string) => {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', '-layout', path, '-'], { encoding: 'utf8' });
};

describe('model-summary PDF after multiple imputation (through the worker api)', () => {
  // birthwt with values removed (fixture reference/mi-pool.json, from tests/fixtures/reference/mi-pool.R).
  const spec: ModelSpec = {
    outcome: 'low',
    event: '1',
    terms: ['age', 'lwt', 'race', 'smoke'].map((column) => ({ type: 'main' as const, column })),
  };
  const req: FitRequest = { spec, method: 'ml', level: 0.95, alpha: 1, profile: false };
  const costs = { missedCase: 5, falseAlarm: 1 };

  it('adds the pooled model beside the complete-case one, and drops it after a new fit', async () => {
    const api = createApi();
    await api.loadDataset(birthwtIncomplete(), null, 'birthwt-incomplete.csv');
    const view = await api.fitModel(req, 'fit');
    const imputed = await api.fitImputed(req, 'mi');
    const t = text(await api.modelReport(costs, 0.3, '2026-12-02T05:30:00Z', {}), 'with-mi');
    const flat = t.replace(/\s+/g, ' ');
    expect(flat).toContain('Multiple imputation (sensitivity analysis)');
    expect(flat).toMatch(/also fitted on 10 multiply imputed datasets and pooled by Rubin/);
    expect(flat).toContain(`${imputed.nImputedRows} of ${imputed.nRows} rows had a value filled in`);
    // The age line of the pooled table: pooled β first, the complete-case β last.
    const shown = (x: number) => x.toFixed(4).replace('-', '\u2212'); // the PDF prints a true minus sign
    const pooledAge = shown(imputed.rows.find((r) => r.name === 'age')!.estimate);
    const ccAge = shown(view.fit.coefficients.find((c) => c.name === 'age')!.estimate);
    const line = t.split('\n').find((l) => l.trim().startsWith('age') && l.includes(pooledAge));
    expect(line, 'the age row of the pooled table').toBeDefined();
    expect(line!.trim().endsWith(ccAge)).toBe(true);

    await api.fitModel({ ...req, level: 0.9 }, 'refit');
    const after = text(await api.modelReport(costs, 0.3, '2026-12-02T05:31:00Z', {}), 'after-refit');
    expect(after).not.toContain('Multiple imputation (sensitivity analysis)');
  }, 120_000);
});
