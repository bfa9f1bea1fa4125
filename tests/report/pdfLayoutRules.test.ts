import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { warning } from '../../src/engine/core';
import { buildModelReport } from '../../src/report/buildModelReport';
import { PdfLayout } from '../../src/report/pdfLayout';
import { calibrationFrame, freeCorner } from '../../src/report/pdfPlots';
import type { CalibrationPlotData, ReportInput } from '../../src/report/reportInput';
import { birthwtReportInput, birthwtRichSpec } from './birthwtRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-layout-'));
let counter = 0;

/** pdftotext of every page separately (form feeds split the pages). */
function pages(bytes: Uint8Array): string[] {
  const path = join(dir, `r${counter++}.pdf`);
  writeFileSync(path, bytes);
  const text = execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' });
  return text.split('\f').filter((p) => p.trim().length > 0);
}

/** A page's text without the running footer line. */
const body = (page: string): string =>
  page
    .split('\n')
    .filter((l) => !/^Fulcra .* model summary|^page \d+ of \d+$/.test(l.trim()))
    .join('\n');

describe('PDF layout of a birthwt fit with splines', () => {
  let input: ReportInput;
  let text: string[];
  beforeAll(async () => {
    input = await birthwtReportInput(birthwtRichSpec);
    text = pages(buildModelReport(input));
  });

  it('prints warnings without their internal codes', () => {
    const all = [...input.model.warnings, ...(input.warnings ?? [])];
    expect(all.length).toBeGreaterThanOrEqual(2);
    const joined = text.join('\n');
    expect(joined).toContain(all[0].message.slice(0, 40));
    expect(joined).not.toMatch(/\[[a-z]+(-[a-z]+)+\]/);
    for (const w of all) expect(joined).not.toContain(`[${w.code}]`);
  });

  it('repeats the coefficient table header on every page the table runs onto', () => {
    const first = text.findIndex((p) => /\d+\. Coefficients and odds ratios/.test(p));
    const last = text.findIndex((p) => p.includes('Terms with more than one design variable'));
    expect(first).toBeGreaterThanOrEqual(0);
    expect(last, 'the coefficient table crosses a page').toBeGreaterThan(first);
    for (let i = first; i <= last; i++) expect(text[i], `page ${i + 1}`).toContain('Design variable');
  });
});

describe('PdfLayout tables', () => {
  it('repeats the header of a table that crosses pages', () => {
    const L = new PdfLayout();
    const rows = Array.from({ length: 150 }, (_, i) => [`term_${i}`, String(i)]);
    L.table(
      [
        { header: 'Design variable', width: 60 },
        { header: 'Estimate', width: 30, align: 'right' },
      ],
      rows,
    );
    const text = pages(new Uint8Array(L.doc.output('arraybuffer')));
    expect(text.length).toBeGreaterThanOrEqual(3);
    for (const p of text) expect(p.match(/Design variable/g)).toHaveLength(1);
  });
});

describe('the cautions never stand alone on a page', () => {
  it('keeps the cautions with the end of the warnings however many warnings come before', async () => {
    const base = await birthwtReportInput(birthwtRichSpec);
    for (let k = 0; k <= 16; k++) {
      const extra = Array.from({ length: k }, (_, i) =>
        warning(
          'test-extra-warning',
          `Extra warning ${i + 1}, long enough to wrap over several lines of the report so that the page fills ` +
            'at a different place for every count of warnings tried here, moving the end of the warnings down ' +
            'by about four lines at a time until it has passed every height at which the cautions could start.',
          'Nothing to do.',
        ),
      );
      const text = pages(buildModelReport({ ...base, warnings: [...(base.warnings ?? []), ...extra] }));
      const at = text.findIndex((p) => /\d+\. Cautions/.test(p));
      expect(at, `${k} extra warnings`).toBeGreaterThanOrEqual(0);
      const before = body(text[at]).split(/\d+\. Cautions/)[0];
      expect(before.trim().length, `${k} extra warnings: text before the cautions on their page`).toBeGreaterThan(0);
    }
  });
});

describe('calibration plot frame', () => {
  const grid = Array.from({ length: 61 }, (_, i) => 0.01 * i);
  it('covers the observed curve and its band, not only the predicted risks', () => {
    const data: CalibrationPlotData = {
      predicted: grid,
      observed: grid.map((p) => Math.min(0.97, 1.6 * p)),
      lower: grid.map((p) => Math.max(0, 1.6 * p - 0.1)),
      upper: grid.map((p) => Math.min(0.99, 1.6 * p + 0.1)),
    };
    const f = calibrationFrame(data);
    expect(f.hi).toBe(1);
    expect(Math.max(...data.observed)).toBeLessThanOrEqual(f.hi);
    const low: CalibrationPlotData = { predicted: grid, observed: grid.map((p) => 1.2 * p + 0.01) };
    expect(calibrationFrame(low).hi).toBeCloseTo(0.8, 12);
  });

  it('puts the legend in a corner the band and curve leave free', () => {
    const data: CalibrationPlotData = {
      predicted: grid,
      observed: grid.map((p) => p + 0.1),
      lower: grid.map((p) => Math.max(0, p - 0.05)),
      upper: grid.map((p) => Math.min(1, p + 0.4)),
    };
    const f = calibrationFrame(data);
    expect(f.hi).toBeCloseTo(1, 12);
    expect(f.corner).toBe('bottom-right');
  });

  it('freeCorner picks the corner with least data under the box', () => {
    const covered = (x: number, y: number): boolean => !(x > 0.5 && y > 0.5);
    expect(freeCorner([0, 1], [0, 1], 0.4, 0.3, covered)).toBe('top-right');
    expect(freeCorner([0, 1], [0, 1], 0.4, 0.3, () => false)).toBe('top-left');
  });
});
