import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../src/engine/core';
import { analyse } from '../../src/engine/workflow';
import { importFile } from '../../src/io/importFile';
import { buildModelReport } from '../../src/report/buildModelReport';
import { reportInputFromRecords } from '../../src/report/fromEngine';
import { FULCRA_VERSION } from '../../src/report/version';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-sample-size-'));

/** The PDF's text by pdftotext -layout (poppler-utils: a label beside its value), whitespace collapsed. */
function pdfText(bytes: Uint8Array, name: string): string {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-layout', '-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

const meta = {
  fulcraVersion: FULCRA_VERSION,
  created: '2026-12-03T00:00:00Z',
  seed: null,
  dataChecksum: '0'.repeat(64),
};

/** The sample-size section of the PDF of one analysis (the record the page and npm run fit hold). */
async function sampleSizeSection(file: string, spec: ModelSpec, name: string) {
  const { dataset } = await importFile(readFileSync(`tests/fixtures/data/${file}`), file, {});
  const record = await analyse(dataset, { spec, profile: false });
  const input = reportInputFromRecords({
    meta,
    source: { fileName: file, rows: dataset.nRows, columns: dataset.columns.length, dateRange: null },
    fit: record.fit,
    sampleSize: record.sampleSize!,
  });
  const text = pdfText(buildModelReport(input), name);
  return {
    sampleSize: record.sampleSize!,
    section: text.slice(text.indexOf('Sample size'), text.indexOf('Modelling method')),
  };
}

const main = (...columns: string[]) => columns.map((column) => ({ type: 'main' as const, column }));
// R 4.2.2 on datasets::infert, Riley's closed forms: (i) 227, (ii) 146, (iii) 343 (sample-size-infert.R).
const infertRef = JSON.parse(readFileSync('tests/fixtures/reference/sample-size-infert.json', 'utf8'));

describe('the PDF gives each Riley criterion its own verdict and consequence', () => {
  it('on infert (248 rows), only (iii) fails: an imprecise overall risk, not over-fitting', async () => {
    const spec = { outcome: 'case', event: '1', terms: main('age', 'parity', 'education', 'induced', 'spontaneous') };
    const { sampleSize, section } = await sampleSizeSection('infert.csv', spec, 'infert');
    expect(sampleSize.criteria.map((c) => c.n)).toEqual(infertRef.required);
    expect(sampleSize.criteria.map((c) => c.met)).toEqual([true, true, false]);
    expect(section).toContain('(i) expected shrinkage 227: met');
    expect(section).toContain('(ii) optimism in Nagelkerke R² 146: met');
    expect(section).toContain(
      "(iii) precise overall risk 343: NOT met. The overall risk (intercept) is imprecise: the model's " +
        'average risk may be off by more than ±0.05.',
    );
    expect(section).toContain('NOT met: 248 rows used < 343 required; short of (iii) precise overall risk');
    expect(section).not.toMatch(/overfitting|over-fitting/);
  });

  it('on birthwt with 6 coefficients, (i) fails too and says to expect over-fitting', async () => {
    const spec = { outcome: 'low', event: '1', terms: main('age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui') };
    const { sampleSize, section } = await sampleSizeSection('birthwt.csv', spec, 'birthwt');
    expect(sampleSize.criteria.map((c) => c.met)).toEqual([false, true, false]);
    expect(section).toContain(
      `(i) expected shrinkage ${sampleSize.criteria[0].n}: NOT met. Expect over-fitting: predictions too extreme ` +
        '(expected shrinkage below 0.9); shrink the coefficients (a penalised fit) or use fewer parameters.',
    );
    expect(section).toContain('The overall risk (intercept) is imprecise');
  });
});
