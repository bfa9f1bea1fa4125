import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core';
import { generateDemo } from '../../src/engine/demo';
import type { ImportResult } from '../../src/io/types';
import { buildModelReport } from '../../src/report/buildModelReport';
import type { ReportInput } from '../../src/report/reportInput';
import {
  AUTHOR,
  SECTION,
  TRIPOD_TITLE,
  tripodChecklist,
  type DrawnSection,
  type TripodItem,
} from '../../src/report/reportSectionTripod';
import { loadDemo } from '../../src/worker/dataOps';
import { fitModel } from '../../src/worker/modelOps';
import { modelReport } from '../../src/worker/reportOps';
import { createSession } from '../../src/worker/session';
import { externalValidate } from '../../src/worker/validateOps';
import { birthwtReportInput } from './birthwtRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-tripod-'));
let counter = 0;
const squash = (s: string) => s.replace(/\s+/g, ' ');

/** pdftotext (poppler-utils) of each page. */
function pages(bytes: Uint8Array, name = `t${counter++}`): string[] {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' })
    .split('\f')
    .filter((p) => p.trim().length > 0);
}

/** The numbered headings of a PDF as drawn: number, title, page (1-based). */
function headings(text: string[]): DrawnSection[] {
  return text.flatMap((p, i) =>
    [...p.matchAll(/^(\d+)\. (.+)$/gm)].map((m) => ({ number: Number(m[1]), title: m[2].trim(), page: i + 1 })),
  );
}

/** The checklist part of the PDF text, whitespace collapsed ('' when the PDF has none). */
function checklistText(text: string[]): string {
  const all = squash(text.join('\n'));
  const at = all.search(/\d+\. TRIPOD\+AI checklist/);
  return at < 0 ? '' : all.slice(at);
}

const item = (items: TripodItem[], topic: RegExp): TripodItem => {
  const found = items.filter((i) => topic.test(i.topic));
  expect(found, String(topic)).toHaveLength(1);
  return found[0];
};

describe('the TRIPOD+AI checklist page of a birthwt summary (fit, bootstrap, Riley, threshold, typed text)', () => {
  let input: ReportInput;
  let text: string[];
  let drawn: DrawnSection[];
  beforeAll(async () => {
    input = await birthwtReportInput();
    text = pages(buildModelReport(input), 'birthwt');
    drawn = headings(text);
  });

  it('comes last, on a page of its own, and cites Collins et al. 2024', () => {
    const last = drawn[drawn.length - 1];
    expect(last.title).toBe(TRIPOD_TITLE);
    expect(drawn[drawn.length - 2].title).toBe(SECTION.glossary);
    expect(last.page).toBeGreaterThan(drawn[drawn.length - 2].page);
    const page = squash(text[last.page - 1]);
    expect(page).toContain('TRIPOD+AI statement');
    expect(page).toContain('BMJ 2024;385:e078378');
    expect(page).toContain('without item numbers');
  });

  it('names only sections the PDF has, with their own number and page', () => {
    const list = checklistText(text);
    const refs = [...list.matchAll(/\u201c([^\u201d]+)\u201d \(section (\d+), p\. (\d+)\)/g)];
    expect(refs.length).toBeGreaterThan(20);
    for (const [ref, title, n, p] of refs) {
      const h = drawn.find((d) => d.title === title);
      expect(h, ref).toBeDefined();
      expect({ number: h!.number, page: h!.page }, ref).toEqual({ number: Number(n), page: Number(p) });
    }
    // every section the summary always prints is matched by its title
    const titles = new Set(refs.map((r) => r[1]));
    for (const t of ['purpose', 'data', 'predictors', 'sampleSize', 'method', 'equation', 'odds'] as const)
      expect(titles.has(SECTION[t]), t).toBe(true);
    for (const t of ['performance', 'plots', 'threshold', 'warnings', 'cautions', 'glossary'] as const)
      expect(titles.has(SECTION[t]), t).toBe(true);
  });

  it('follows the report: Riley criteria, internal validation, threshold and typed text answer their topics', () => {
    const items = tripodChecklist(input, drawn);
    const size = item(items, /^Size of the study/);
    expect(size.status).toBe('answered');
    expect(size.where[0]).toMatch(/^\u201cSample size\u201d \(section 4, p\. \d\): .*Riley/);
    expect(item(items, /^Type of model/).where.join(' ')).toContain('optimism-corrected');
    expect(item(items, /^How the data were used/).where[0]).toContain('internal validation by resampling');
    expect(item(items, /^What the model outputs/).status).toBe('answered');
    expect(item(items, /^Setting \(primary/).where[0]).toContain('the setting as typed by the user');
    expect(item(items, /^Objectives/).status).toBe('answered');
  });

  it('leaves a topic to the author when its section or content is absent', () => {
    const bare: ReportInput = {
      ...input,
      sampleSize: undefined,
      corrected: undefined,
      threshold: undefined,
      freeText: {},
    };
    const bareText = pages(buildModelReport(bare), 'bare');
    const bareDrawn = headings(bareText);
    expect(bareDrawn.map((d) => d.title)).not.toContain(SECTION.threshold);
    const items = tripodChecklist(bare, bareDrawn);
    const size = item(items, /^Size of the study/);
    expect(size.status).toBe('partly');
    expect(size.author).toContain('Riley criteria were not computed');
    expect(item(items, /^How the data were used/).where[0]).toContain('no internal validation');
    const output = item(items, /^What the model outputs/);
    expect(output.status).toBe('partly');
    expect(output.where.join(' ')).not.toContain(SECTION.threshold);
    expect(item(items, /^Setting \(primary/).status).toBe('author');
    expect(item(items, /^Objectives/).status).toBe('partly');
    // an absent section leaves no line behind: every place named is a drawn section or the title block
    for (const i of items)
      for (const w of i.where)
        expect(w, i.topic).toMatch(/^(\u201c[^\u201d]+\u201d \(section \d+, p\. \d+\): |Title block)/);
    // the printed page says the same
    const list = checklistText(bareText);
    expect(list).not.toContain(`\u201c${SECTION.threshold}\u201d`);
    expect(list).toContain(`${AUTHOR}: setting and centres (not typed on the page).`);
  });

  it('gives study dates to the summary only when a date column was given', () => {
    const dates = (i: ReportInput) => item(tripodChecklist(i, drawn), /^Dates:/);
    expect(dates(input).status).toBe('author');
    const dated = { ...input, source: { ...input.source, dateRange: { column: 'op_date', from: 'a', to: 'b' } } };
    expect(dates(dated).status).toBe('partly');
    expect(dates(dated).where[0]).toContain('date range of column "op_date"');
  });

  // the titles these sections are drawn with (reportSectionSubgroups.ts, reportSectionComparison.ts, pointsCardPdf.ts)
  it('names a subgroup, comparison or points section when the summary has one', () => {
    const before = tripodChecklist(input, drawn);
    expect(item(before, /^Any approach to the fairness/).status).toBe('author');
    expect(item(before, /^Performance with confidence/).status).toBe('partly');
    const more = [
      ...drawn.slice(0, -1),
      { number: 90, title: 'Performance by subgroup', page: 7 },
      { number: 91, title: 'Comparison of two models', page: 7 },
      { number: 92, title: 'Bedside points score', page: 8 },
    ];
    const after = tripodChecklist(input, more);
    const fair = item(after, /^Any approach to the fairness/);
    expect(fair.status).toBe('partly');
    expect(fair.where[0]).toBe('\u201cPerformance by subgroup\u201d (section 90, p. 7): performance per subgroup');
    expect(item(after, /^Performance with confidence/).status).toBe('answered');
    expect(item(after, /^Performance measures/).where.join(' ')).toContain('\u201cComparison of two models\u201d');
    expect(item(after, /^The full model/).where.join(' ')).toContain('\u201cBedside points score\u201d');
  });

  it('always leaves funding, ethics, conflicts, registration and public involvement to the author', () => {
    const items = tripodChecklist(input, drawn);
    for (const t of [/^Funding$/, /^Ethics/, /^Conflicts/, /^Registration$/, /^How patients and the public/]) {
      const i = item(items, t);
      expect(i.status, String(t)).toBe('author');
      expect(i.where).toEqual([]);
    }
  });

  it('is left out of a summary in the quality setting (TRIPOD+AI is for clinical prediction models)', () => {
    const quality = pages(buildModelReport({ ...input, cautionSetting: 'quality' }), 'quality');
    expect(checklistText(quality)).toBe('');
    expect(headings(quality).map((d) => d.title)).not.toContain(TRIPOD_TITLE);
  });
});

describe('the checklist of the invented surgical demo, built by the worker as the page does', () => {
  const demo = generateDemo('ssi');
  const asImport = (dataset: Dataset) => ({ dataset, warnings: [] }) as unknown as ImportResult;
  const half = (d: Dataset, from: number, to: number): Dataset => ({
    nRows: to - from,
    columns: d.columns.map((c) =>
      c.kind === 'numeric' ? { ...c, values: c.values.slice(from, to) } : { ...c, codes: c.codes.slice(from, to) },
    ),
  });

  it('names influential rows, then the external validation and its recalibration once they exist', async () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    await fitModel(s, { spec: demo.spec, profile: false }, {});
    const report = () => modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.2, '2026-01-01T00:00:00Z', {});
    const first = pages(report(), 'ssi');
    if (process.env.FULCRA_PDF_OUT) writeFileSync(process.env.FULCRA_PDF_OUT, report());
    const list = checklistText(first);
    expect(list).toMatch(/\u201cInfluential rows\u201d \(section \d+, p\. \d+\): rows that move the model most/);
    expect(list).not.toContain(`\u201c${SECTION.external}\u201d`);
    expect(list).toContain(`${AUTHOR}: any updating (none in this summary).`);

    externalValidate(s, asImport(half(demo.dataset, 1000, 2000)));
    const second = pages(report(), 'ssi-external');
    const drawn = headings(second);
    const ext = drawn.find((d) => d.title === SECTION.external)!;
    expect(ext).toBeDefined();
    const list2 = checklistText(second);
    const ref = `\u201c${SECTION.external}\u201d (section ${ext.number}, p. ${ext.page})`;
    expect(list2).toContain(`${ref}: the evaluation file`);
    expect(list2).toContain(`${ref}: recalibrated for that setting`);
    expect(list2).not.toContain('any updating (none in this summary)');
  });
});
