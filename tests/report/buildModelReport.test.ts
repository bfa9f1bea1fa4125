import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { fit } from '../../src/engine/fitting/fit';
import { createModelFile, modelFileToFitResult, modelFileToJson } from '../../src/io/export/modelFile';
import { readModelFile } from '../../src/io/export/readModelFile';
import { buildModelReport, REPORT_CAUTIONS } from '../../src/report/buildModelReport';
import { formatFixed, formatP, formatSig } from '../../src/report/format';
import type { ReportInput } from '../../src/report/reportInput';
import { FULCRA_VERSION } from '../../src/report/version';
import { birthwtReportInput, birthwtRichSpec, birthwtSpec, loadBirthwt } from './birthwtRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-report-'));

/** Writes the PDF and returns pdftotext's text (poppler-utils; -layout off so lines follow reading order). */
function pdfText(bytes: Uint8Array, name: string): { text: string; path: string } {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  return { text: execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }), path };
}

/** Fraction of non-white pixels of one page rendered by pdftoppm at 60 dpi (binary PPM, P6). */
function inkFraction(pdfPath: string, page: number): number {
  const out = join(dir, `page-${page}`);
  execFileSync('pdftoppm', ['-r', '60', '-f', String(page), '-l', String(page), '-singlefile', pdfPath, out]);
  const buf = readFileSync(`${out}.ppm`);
  const header = buf.subarray(0, 20).toString('latin1').split(/\s+/);
  const [w, h] = [Number(header[1]), Number(header[2])];
  const start = buf.length - w * h * 3;
  let ink = 0;
  for (let i = start; i < buf.length; i += 3) if (buf[i] < 235 || buf[i + 1] < 235 || buf[i + 2] < 235) ink++;
  return ink / (w * h);
}

function pageCount(path: string): number {
  const info = execFileSync('pdfinfo', [path], { encoding: 'utf8' });
  return Number(/Pages:\s+(\d+)/.exec(info)![1]);
}

describe('model-summary PDF of a real birthwt fit with splines and interactions', () => {
  let input: ReportInput;
  let text: string;
  let path: string;
  beforeAll(async () => {
    input = await birthwtReportInput(birthwtRichSpec);
    input.freeText = { ...input.freeText, notes: 'Reviewed for the \u2264 30-day audit; \u03b2 and \u00b1 render.' };
    ({ text, path } = pdfText(buildModelReport(input), 'rich'));
  });

  it('is a PDF whose every page says "page i of n"', () => {
    const n = pageCount(path);
    expect(n).toBeGreaterThanOrEqual(3);
    for (let i = 1; i <= n; i++) expect(text).toContain(`page ${i} of ${n}`);
  });

  it('has every section in order', () => {
    const headings = [
      '1. Purpose, setting and population',
      '2. Data and outcome',
      '3. Predictors and their handling',
      '4. Sample size',
      '5. Modelling method',
      '6. Model equation',
      '7. Coefficients and odds ratios',
      '8. Performance',
      '9. Calibration, discrimination and net benefit',
      '10. Decision threshold',
      '11. Warnings',
      '12. Cautions',
    ];
    const at = headings.map((h) => text.indexOf(h));
    expect(at.every((i) => i >= 0)).toBe(true);
    expect([...at].sort((a, b) => a - b)).toEqual(at);
  });

  it('states the version, seed, date, full data checksum and data source', () => {
    expect(text).toContain('Fulcra version');
    expect(text).toContain(FULCRA_VERSION);
    expect(text).toContain('20261202');
    expect(text).toContain('2026-12-02 01:30 UTC');
    expect(text).toContain(`SHA-256 ${input.meta.dataChecksum}`);
    expect(input.meta.dataChecksum).toMatch(/^[0-9a-f]{64}$/);
    expect(text).toContain('birthwt.csv');
    expect(text).toContain('"low"; the event is "1"');
  });

  it('carries the user\u2019s free text, including non-Latin-1 characters', () => {
    expect(text).toContain(input.freeText!.purpose!);
    expect(text).toContain('Reviewed for the \u2264 30-day audit; \u03b2 and \u00b1 render.');
  });

  it('prints the full equation: intercept and every coefficient to 6 significant figures, with the coding', () => {
    const m = input.model;
    expect(text).toContain(`logit(risk) = ${formatSig(m.coefficients[0].estimate, 6)}`);
    for (const c of m.coefficients.slice(1)) {
      const sign = c.estimate < 0 ? '\u2212' : '+';
      expect(text).toContain(`${sign} ${formatSig(Math.abs(c.estimate), 6)} \u00d7 [${c.name}]`);
    }
    expect(text).toContain('[race=2] = 1 if "race" is "2", otherwise 0.');
    expect(text).toContain('reference level "1"');
    expect(text).toContain('knots at 16, 20, 25, 32');
    expect(text).toContain('c(u) = max(u, 0)\u00b3');
  });

  it('shows odds ratios, profile intervals and p-values as the formatter writes them', () => {
    const smoke = input.model.coefficients.find((c) => c.name === 'smoke')!;
    const row =
      `smoke ${formatFixed(smoke.estimate, 4)} ${formatFixed(smoke.se, 4)} ${formatFixed(smoke.oddsRatio, 3)} ` +
      `${formatFixed(Math.exp(smoke.profileLower!), 3)} to ${formatFixed(Math.exp(smoke.profileUpper!), 3)} ` +
      formatP(smoke.p);
    expect(text.replace(/\s+/g, ' ')).toContain(row);
    const ageLwt = input.model.coefficients.find((c) => c.name === 'age:lwt')!;
    expect(Math.abs(ageLwt.estimate)).toBeLessThan(0.005);
    expect(text).toContain(formatFixed(ageLwt.oddsRatio, 5));
  });

  it('shows apparent and optimism-corrected performance with the AUC\u2019s DeLong interval', () => {
    const a = input.apparent!;
    expect(text).toContain(
      `${formatFixed(a.auc!.estimate, 3)} (${formatFixed(a.auc!.lower, 3)} to ${formatFixed(a.auc!.upper, 3)})`,
    );
    expect(text).toContain(formatFixed(input.corrected!.auc!.estimate, 3));
    expect(text).toContain('Optimism-corrected');
    expect(text).toContain('20 replicates');
    const ce = input.calibrationErrors!;
    expect(text.replace(/\s+/g, ' ')).toContain(
      `ICI ${formatFixed(ce.ici, 3)}, E50 ${formatFixed(ce.e50, 3)}, ` +
        `E90 ${formatFixed(ce.e90, 3)}, Emax ${formatFixed(ce.emax, 3)}`,
    );
  });

  it('states the threshold, both costs and the confusion matrix at it', () => {
    const t = input.threshold!;
    expect(text).toContain('predicted risk \u2265 16.7% (0.1667)');
    expect(text).toContain('missed event (false negative) 5; false alarm (false positive) 1; ratio 5 : 1');
    const flat = text.replace(/\s+/g, ' ');
    expect(flat).toContain(`Flagged (risk \u2265 threshold) ${t.tp} ${t.fp} ${t.tp + t.fp}`);
    expect(flat).toContain(`Not flagged ${t.fn} ${t.tn} ${t.fn + t.tn}`);
  });

  it('lists every warning in words (no internal code) and all cautions', () => {
    const flat = text.replace(/\s+/g, ' ');
    for (const w of [...input.model.warnings, ...input.warnings!]) {
      expect(flat).toContain(w.message.replace(/\s+/g, ' ').slice(0, 50));
      expect(text).not.toContain(`[${w.code}]`);
    }
    for (const c of REPORT_CAUTIONS) expect(flat).toContain(c.slice(0, 60));
    expect(flat).toContain('not a medical device');
  });

  it('renders the embedded font\u2019s glyphs (\u03b2, \u2265, \u2264, \u2212, \u00b2, \u03c7) as text', () => {
    for (const ch of ['\u03b2', '\u2265', '\u2264', '\u2212', '\u00b2', '\u03c7']) expect(text).toContain(ch);
    const fonts = execFileSync('pdffonts', [path], { encoding: 'utf8' });
    expect(fonts).toMatch(/LiberationSans\s+CID TrueType\s+Identity-H\s+yes/);
  });

  it('draws ink on the first page and on the plot page (not blank)', () => {
    expect(inkFraction(path, 1)).toBeGreaterThan(0.02);
    const plotPage = text.split('\f').findIndex((p) => p.includes('ROC curve')) + 1;
    expect(plotPage).toBeGreaterThan(0);
    expect(inkFraction(path, plotPage)).toBeGreaterThan(0.04);
  });
});

describe('model-summary PDF with little to report', () => {
  it('builds for a ridge fit with no inference or evaluation, says what is missing, numbers sections in order', () => {
    const data = loadBirthwt();
    const ridge = fit(data, birthwtSpec, { method: 'ridge', lambda: 0.05 });
    const input: ReportInput = {
      meta: { fulcraVersion: '0.1.0', created: '2026-12-02T02:00:00Z', seed: null, dataChecksum: '0'.repeat(64) },
      source: {
        fileName: 'x.csv',
        rows: data.nRows,
        dateRange: { column: 'admitted', from: '2024-01-03', to: '2024-12-30' },
      },
      model: ridge,
      lambdaChoice: '10-fold cross-validation, one-standard-error rule',
    };
    const { text } = pdfText(buildModelReport(input), 'ridge');
    expect(text).toContain('Ridge (L2) penalised logistic regression, \u03bb = 0.05');
    expect(text).toContain('10-fold cross-validation, one-standard-error rule');
    expect(text).toContain('2024-01-03 to 2024-12-30 (column "admitted")');
    expect(text).toContain('Performance was not evaluated for this report.');
    expect(text).toContain('Not stated by the user.');
    expect(text).toContain('none used');
    expect(text).toContain('8. Performance');
    expect(text).toContain('9. Warnings');
    expect(text).toContain('10. Cautions');
    expect(text).not.toContain('Decision threshold');
    expect(text).toContain('Intervals: none (not valid for this method).');
    expect(text).toContain('not reported (no valid intervals after penalised shrinkage)');
  });

  it('builds from a model re-opened from its file, with the same equation', () => {
    const data = loadBirthwt();
    const original = fit(data, birthwtRichSpec);
    const reopened = modelFileToFitResult(
      readModelFile(modelFileToJson(createModelFile(original, { fulcraVersion: FULCRA_VERSION }))),
    );
    const meta = {
      fulcraVersion: FULCRA_VERSION,
      created: '2026-12-02T02:00:00Z',
      seed: null,
      dataChecksum: '1'.repeat(64),
    };
    const a = pdfText(
      buildModelReport({ meta, source: { fileName: 'b.csv', rows: 189 }, model: original }),
      'orig',
    ).text;
    const b = pdfText(
      buildModelReport({ meta, source: { fileName: 'b.csv', rows: 189 }, model: reopened }),
      'reopened',
    ).text;
    const eq = (t: string) => t.slice(t.indexOf('logit(risk) ='), t.indexOf('risk = 1 / (1 + exp('));
    expect(eq(b)).toBe(eq(a));
    expect(eq(a)).toContain(`${formatSig(original.coefficients[0].estimate, 6)}`);
  });
});
