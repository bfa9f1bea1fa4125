import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { KNOT_RULE } from '../../src/report/rules';
import { buildModelReport } from '../../src/report/buildModelReport';
import { birthwtReportInput, birthwtRichSpec, birthwtSpec } from './birthwtRecord';

/** The PDF's text by pdftotext (poppler-utils), with every run of white space as one space. */
function pdfText(bytes: Uint8Array): string {
  const path = join(mkdtempSync(join(tmpdir(), 'fulcra-knots-')), 'report.pdf');
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

describe('the PDF states how spline knots and reference levels were chosen', () => {
  it('states the knot rule when the model has a spline, and the reference rule for categorical terms', async () => {
    const text = pdfText(buildModelReport(await birthwtReportInput(birthwtRichSpec)));
    expect(text).toContain(KNOT_RULE);
    expect(text).toContain("Knots at Harrell's default quantiles (Hmisc rcspline.eval)");
    expect(text).toContain('Reference level, unless one was chosen: the absence level of a two-level column');
  }, 60_000);

  it('leaves the knot rule out when no term is a spline', async () => {
    const text = pdfText(buildModelReport(await birthwtReportInput(birthwtSpec)));
    expect(text).not.toContain('rcspline.eval');
  }, 60_000);
});
