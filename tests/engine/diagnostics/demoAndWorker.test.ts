import { writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { generateDemo, ssiSeededError } from '../../../src/engine/demo';
import { getColumn, sheetRow } from '../../../src/engine/core';
import { analyse, runAnalysis } from '../../../src/engine/workflow';
import { readModelFile } from '../../../src/io/export/readModelFile';
import { loadDemo } from '../../../src/worker/dataOps';
import { diagnosticsView } from '../../../src/worker/diagnosticsOps';
import { fitModel } from '../../../src/worker/modelOps';
import { modelFileText, modelReport } from '../../../src/worker/reportOps';
import { createSession } from '../../../src/worker/session';

const demo = generateDemo('ssi');

describe('the seeded data-entry error of the invented surgical demo', () => {
  it('is in the data: an operation of 2880 minutes on spreadsheet row 1056', () => {
    const dur = getColumn(demo.dataset, 'duration_min');
    expect(dur.kind === 'numeric' && dur.values[ssiSeededError.dataRow]).toBe(2880);
    expect(sheetRow(demo.dataset, ssiSeededError.dataRow)).toBe(ssiSeededError.sheetRow);
  });

  it('is the top row by Cook’s distance, named in warnings; leaving it out restores the duration OR', async () => {
    const { record, diagnostics } = await runAnalysis(demo.dataset, { spec: demo.spec, profile: false });
    const d = record.diagnostics!;
    expect(d.top[0].sheetRow).toBe(1056);
    expect(d.top[0].dataRow).toBe(1054);
    expect(d.top[0].cooks!).toBeGreaterThan(20 * d.top[1].cooks!);
    expect(d.top[0].shift?.coefficient).toBe('duration_min');
    const codes = d.warnings.map((w) => w.code);
    expect(codes).toContain('diagnostic-large-residual');
    expect(codes).toContain('diagnostic-odds-ratio-shift');
    expect(d.warnings.find((w) => w.code === 'diagnostic-odds-ratio-shift')!.message).toMatch(
      /row 1056 .*duration_min/,
    );
    // per-row arrays are not in the record
    expect(JSON.stringify(record).length).toBeLessThan(200_000);
    expect(diagnostics.cooks!.length).toBe(record.fit.nUsed);

    const without = await analyse(demo.dataset, { spec: demo.spec, profile: false, leaveOut: [1056] });
    expect(without.request.leaveOut).toEqual([1056]);
    expect(without.fit.nUsed).toBe(record.fit.nUsed - 1);
    expect(without.warnings.map((w) => w.code)).toContain('rows-left-out');
    const dur = (r: typeof record) => r.fit.coefficients.find((c) => c.name === 'duration_min')!.estimate;
    // the true coefficient is 0.006 per minute (ssiTruth): the error pulls it to about half, leaving it out restores it
    expect(dur(record)).toBeLessThan(0.0035);
    expect(dur(without)).toBeGreaterThan(0.005);
    // the one-step estimate of the odds ratio without the row is close to the refit's
    expect(Math.abs(Math.log(d.top[0].shift!.oddsRatioAfter) - dur(without))).toBeLessThan(0.15 * dur(without));
    // the original data stay untouched
    const col = getColumn(demo.dataset, 'duration_min');
    expect(col.kind === 'numeric' && col.values[ssiSeededError.dataRow]).toBe(2880);
    expect(demo.dataset.nRows).toBe(2000);
  });
});

describe('worker: diagnostics query, model file and PDF', () => {
  it('gives plot points with spreadsheet rows; rows left out are in the model file and the PDF', async () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    await fitModel(s, { spec: demo.spec, profile: false }, {});
    const v = diagnosticsView(s);
    expect(v.leftOut).toEqual([]);
    expect(v.points.sheetRow.length).toBe(v.rowsUsed);
    const k = v.points.sheetRow.indexOf(1056);
    expect(v.points.cooks![k]).toBe(v.summary.top[0].cooks);

    await fitModel(s, { spec: demo.spec, profile: false, leaveOut: [1056] }, {});
    const v2 = diagnosticsView(s);
    expect(v2.leftOut).toEqual([1056]);
    expect(v2.points.sheetRow.includes(1056)).toBe(false);
    // grid indices still point into the original data: row 1057 is data row 1055
    const k2 = v2.points.sheetRow.indexOf(1057);
    if (k2 >= 0) expect(v2.points.dataRow[k2]).toBe(1055);
    const file = readModelFile(modelFileText(s, { missedCase: 10, falseAlarm: 1 }, 0.2, '2026-01-01T00:00:00Z', {}));
    expect(file.training.rowsLeftOut).toEqual([1056]);
    const pdf = modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.2, '2026-01-01T00:00:00Z', {});
    expect(Buffer.from(pdf.subarray(0, 5)).toString('latin1')).toBe('%PDF-');
    if (process.env.FULCRA_PDF_OUT) writeFileSync(process.env.FULCRA_PDF_OUT, pdf);
  });

  it('writes the all-rows PDF too (for looking at)', async () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    await fitModel(s, { spec: demo.spec, profile: false }, {});
    const pdf = modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.2, '2026-01-01T00:00:00Z', {});
    if (process.env.FULCRA_PDF_OUT) writeFileSync(process.env.FULCRA_PDF_OUT.replace('.pdf', '-all.pdf'), pdf);
    expect(pdf.length).toBeGreaterThan(10_000);
  });
});
