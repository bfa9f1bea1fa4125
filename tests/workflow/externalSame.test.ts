import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core';
import { generateDemo } from '../../src/engine/demo';
import type { ImportResult } from '../../src/io/types';
import { EXTERNAL_CAUTION } from '../../src/report/reportSectionExternal';
import { loadDemo } from '../../src/worker/dataOps';
import { fitModel } from '../../src/worker/modelOps';
import { modelReport } from '../../src/worker/reportOps';
import { createSession } from '../../src/worker/session';
import { externalValidate } from '../../src/worker/validateOps';

const demo = generateDemo('ssi');
const asImport = (dataset: Dataset) => ({ dataset, warnings: [] }) as unknown as ImportResult;

/** Rows `from`…`to`−1 of a dataset, with age shifted by `shift` years. */
function slice(d: Dataset, from: number, to: number, shift = 0): Dataset {
  return {
    nRows: to - from,
    columns: d.columns.map((c) =>
      c.kind === 'numeric'
        ? { ...c, values: c.values.slice(from, to).map((v) => (c.name === 'age' ? v + shift : v)) }
        : { ...c, codes: c.codes.slice(from, to) },
    ),
  };
}

async function fitted() {
  const s = createSession();
  loadDemo(s, 'ssi');
  await fitModel(s, { spec: demo.spec, profile: false }, {});
  return s;
}

function pdfText(bytes: Uint8Array): string {
  const path = join(mkdtempSync(join(tmpdir(), 'fulcra-ext-')), 'x.pdf');
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

describe('external validation on the development data itself', () => {
  it('says the file holds the same cases (also in shuffled order), and the PDF says it is not external', async () => {
    const s = await fitted();
    const view = externalValidate(s, asImport(demo.dataset));
    expect(view).toMatchObject({ sameCases: true, sharedCases: view.n });
    expect(view.recalibration!.intercept).toBeCloseTo(0, 6);
    expect(view.recalibration!.slope).toBeCloseTo(1, 6);
    expect(view.warnings[0].code).toBe('external-same-cases');
    expect(view.warnings[0].message).toContain('this is not an external validation');
    const n = demo.dataset.nRows;
    const shuffled = slice(demo.dataset, 0, n);
    const order = Int32Array.from({ length: n }, (_, i) => (i * 7919) % n); // 7919 is prime, n = 2000
    for (const c of shuffled.columns) {
      if (c.kind === 'numeric') c.values = Float64Array.from(order, (r) => c.values[r]);
      else c.codes = Int32Array.from(order, (r) => c.codes[r]);
    }
    expect(externalValidate(s, asImport(shuffled)).sameCases).toBe(true);
    const text = pdfText(modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z'));
    expect(text).toContain('External validation');
    expect(text).toContain('this is not an external validation');
  });

  it('counts development cases in a part of the data; new cases give none and a plain external section', async () => {
    const s = await fitted();
    const part = externalValidate(s, asImport(slice(demo.dataset, 0, 600)));
    expect(part.sameCases).toBe(false);
    expect(part.sharedCases).toBe(part.n);
    expect(part.warnings[0].code).toBe('external-shared-cases');
    const other = externalValidate(s, asImport(slice(demo.dataset, 0, 600, 0.5)));
    expect(other).toMatchObject({ sameCases: false, sharedCases: 0 });
    expect(other.warnings.some((w) => w.code.startsWith('external-s'))).toBe(false);
    const text = pdfText(modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z'));
    expect(text).toContain('External validation');
    expect(text).not.toContain('this is not an external validation');
    expect(text).toContain(`${other.n} scored`);
    expect(text).toContain(other.performance.auc.toFixed(3));
    expect(text).toContain(`intercept ${other.recalibration!.intercept.toFixed(3)}`.replace('-', '\u2212'));
    expect(text).toContain(EXTERNAL_CAUTION.slice(0, 60));
  });
});

describe('npm run fit --test with the development file itself', () => {
  it('says in the record that the test file holds the same cases, as the page does', () => {
    const args = ['tsx', 'src/cli/fit.ts', 'tests/fixtures/data/birthwt.csv', '--outcome', 'low', '--json'];
    const out = (test: string) =>
      JSON.parse(execFileSync('npx', [...args, '--predictors', 'age,lwt,smoke', '--test', test], { encoding: 'utf8' }));
    const same = out('tests/fixtures/data/birthwt.csv').external;
    expect(same.developmentCasesShared).toBe(189);
    expect(same.warnings[0].code).toBe('external-same-cases');
    expect(same.warnings[0].message).toMatch(/this is not an external validation/);
  });
});
