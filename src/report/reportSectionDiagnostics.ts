import { scaleLinear } from 'd3';
import type { DiagnosticsSummary } from '../engine/diagnostics';
import { fmtOddsRatio } from '../engine/diagnostics';
import { DASH, formatCount, formatFixed } from './format';
import { FONT, type PdfLayout } from './pdfLayout';

/** What the PDF's diagnostics section prints: the record's summary and Cook's distance by row for the plot. */
export interface DiagnosticsReport {
  summary: DiagnosticsSummary;
  /** Spreadsheet rows left out of the fit on request ([] for a fit on all rows). */
  leftOut: number[];
  /** Cook's distance by spreadsheet row (at most ~2,000: the largest and an even sample); null if it does not apply. */
  cooks: { sheetRow: number[]; value: number[] } | null;
}

/** At most this many rows go into the PDF plot: the largest Cook's distances first, then an even sample. */
export const PDF_PLOT_ROWS = 2000;

/** The rows of the PDF plot from the per-row arrays (row order kept). */
export function cooksForReport(sheetRows: ArrayLike<number>, cooks: ArrayLike<number>): DiagnosticsReport['cooks'] {
  const n = cooks.length;
  const keep = new Set<number>();
  if (n <= PDF_PLOT_ROWS) for (let i = 0; i < n; i++) keep.add(i);
  else {
    const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => (cooks[b] || 0) - (cooks[a] || 0));
    for (const i of order.slice(0, PDF_PLOT_ROWS / 4)) keep.add(i);
    const step = n / (PDF_PLOT_ROWS - keep.size);
    for (let x = 0; x < n; x += step) keep.add(Math.floor(x));
  }
  const rows = [...keep].sort((a, b) => a - b);
  return { sheetRow: rows.map((i) => sheetRows[i]), value: rows.map((i) => cooks[i]) };
}

const num = (x: number | null, digits: number) => (x === null || !Number.isFinite(x) ? DASH : formatFixed(x, digits));

/**
 * "Influential rows": the rows left out on request (if any), the top rows with their spreadsheet row numbers, the
 * warnings that name rows, one plot (Cook's distance by row with the 4/n line) and the rules of the reference lines.
 */
export function diagnosticsSection(L: PdfLayout, d: DiagnosticsReport | undefined): void {
  if (!d) return;
  const s = d.summary;
  L.section('Influential rows');
  if (d.leftOut.length > 0) {
    L.paragraph(
      `Rows left out of this fit on request: spreadsheet row${d.leftOut.length === 1 ? '' : 's'} ` +
        `${d.leftOut.join(', ')}. The data were not changed; the fit on all rows differs.`,
      { bold: true, color: [160, 60, 0] },
    );
  }
  L.paragraph(
    `Leverage, standardised residuals, Cook's distance and DFBETAS of the ${formatCount(s.rowsChecked)} rows used, ` +
      "as R's glm influence measures (one-step formulas, no refit per row). The rows that move the model most" +
      (s.rankedBy === 'cooks' ? " (by Cook's distance):" : ' (by the size of the deviance residual):'),
    { size: 9 },
  );
  L.table(
    [
      { header: 'Row', width: 14 },
      { header: 'Outcome', width: 15 },
      { header: 'Risk', width: 14, align: 'right' },
      { header: 'Leverage', width: 17, align: 'right' },
      { header: 'Std. dev. resid.', width: 20, align: 'right' },
      { header: "Cook's D", width: 17, align: 'right' },
      { header: 'Odds ratio it moves most (one-step)', width: 77 },
    ],
    s.top
      .slice(0, 8)
      .map((t) => [
        String(t.sheetRow),
        t.outcome === 1 ? 'event' : 'no event',
        num(t.risk, 3),
        num(t.leverage, 4),
        num(t.stdDeviance, 2),
        num(t.cooks, 4),
        t.shift
          ? `${t.shift.coefficient}: ${fmtOddsRatio(t.shift.oddsRatioBefore)} to ` +
            `${fmtOddsRatio(t.shift.oddsRatioAfter)} ` +
            `(${t.shift.inSe.toFixed(1)} SE)`
          : DASH,
      ]),
    8,
  );
  for (const w of s.warnings) L.bullet(`${w.message} ${w.suggestion}`, 8.5);
  if (d.cooks) cooksPlot(L, d.cooks, s);
  L.paragraph(`Reference lines: ${s.thresholds.map((t) => t.rule).join('; ')}.`, { size: 8, color: [80, 80, 80] });
  for (const a of s.applicability.filter((x) => x.status !== 'exact'))
    L.paragraph(`${a.measure}: ${a.status}. ${a.why}`, { size: 8, color: [80, 80, 80] });
}

function cooksPlot(L: PdfLayout, c: NonNullable<DiagnosticsReport['cooks']>, s: DiagnosticsSummary): void {
  const w = 150,
    h = 48;
  L.ensure(h + 20);
  const top = L.y + 6;
  const left = L.left + 12;
  const doc = L.doc;
  const four = s.thresholds.find((t) => t.measure === 'cooks')?.value ?? 0;
  const max = Math.max(four * 1.5, ...c.value.filter(Number.isFinite));
  const x = scaleLinear()
    .domain([c.sheetRow[0] ?? 0, c.sheetRow[c.sheetRow.length - 1] ?? 1])
    .range([left, left + w])
    .nice();
  const y = scaleLinear()
    .domain([0, max * 1.05])
    .range([top + h, top])
    .nice();
  doc.setFont(FONT, 'bold');
  doc.setFontSize(9);
  doc.text("Cook's distance by spreadsheet row", left, top - 2);
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  doc.setDrawColor(225, 225, 225);
  doc.setLineWidth(0.15);
  const yt = y.ticks(4);
  const yd = Math.max(0, Math.min(4, -Math.floor(Math.log10((yt[1] ?? 1) - (yt[0] ?? 0)) + 1e-9)));
  for (const t of yt) {
    doc.line(left, y(t), left + w, y(t));
    doc.text(formatFixed(t, yd), left - 1.2, y(t) + 1, { align: 'right' });
  }
  for (const t of x.ticks(6)) doc.text(String(t), x(t), top + h + 3.2, { align: 'center' });
  doc.setDrawColor(60, 60, 60);
  doc.setLineWidth(0.3);
  doc.rect(left, top, w, h, 'S');
  doc.setFontSize(8);
  doc.text('Spreadsheet row', left + w / 2, top + h + 7.5, { align: 'center' });
  doc.text("Cook's D", left - 9, top + h / 2, { align: 'center', angle: 90 });
  // the 4/n line (and 1 when it is in range)
  for (const t of s.thresholds.filter((u) => u.measure === 'cooks' && u.value <= y.domain()[1])) {
    doc.setDrawColor(200, 110, 30);
    doc.setLineWidth(0.3);
    doc.setLineDashPattern([1.2, 0.8], 0);
    doc.line(left, y(t.value), left + w, y(t.value));
    doc.setLineDashPattern([], 0);
    doc.setFontSize(7);
    doc.setTextColor(200, 110, 30);
    doc.text(t.value === 1 ? 'D = 1' : '4/n', left + w - 1, y(t.value) - 0.8, { align: 'right' });
    doc.setTextColor(0, 0, 0);
  }
  doc.setFillColor(31, 90, 160);
  for (let i = 0; i < c.value.length; i++) {
    if (!Number.isFinite(c.value[i])) continue;
    doc.circle(x(c.sheetRow[i]), y(c.value[i]), 0.35, 'F');
  }
  doc.setFontSize(7);
  for (const t of s.top.slice(0, 3)) {
    if (t.cooks === null) continue;
    doc.setFillColor(213, 94, 0); // text drawing resets the fill colour in jsPDF
    doc.circle(x(t.sheetRow), y(t.cooks), 0.9, 'F');
    doc.text(`row ${t.sheetRow}`, x(t.sheetRow) + 1.6, y(t.cooks) + 1);
  }
  L.y = top + h + 11;
}
