import { scaleLinear, scaleLog } from 'd3';
import { forestData, type ForestData, type SubgroupPerformance } from '../engine/subgroups';
import { formatCount, formatFixed, levelText } from './format';
import { FONT, type PdfLayout, type TableColumn } from './pdfLayout';
import { FOREST_MEASURES, forestDomain, PRECISION_WORDS, subgroupTableText } from './subgroupTable';

const SHORT_TITLE: Record<string, string> = {
  observedExpected: 'O/E (log scale)',
  auc: 'AUC',
  calibrationSlope: 'Calibration slope',
};

/**
 * "Performance by subgroup": the groups of the chosen column, the table of n, events, O/E, AUC, calibration and the
 * cut-off measures with their intervals, a forest plot (O/E, AUC, calibration slope) drawn as vectors, the
 * too-small rule with its sources, the warnings naming groups, and how each number was computed.
 */
export function subgroupsSection(L: PdfLayout, perf: SubgroupPerformance | undefined): void {
  if (!perf) return;
  L.section('Performance by subgroup');
  const cut =
    perf.threshold === null
      ? 'No cut-off was set, so there are no sensitivity, specificity or flagged columns.'
      : `Sensitivity, specificity and the fraction flagged are at the cut-off ${formatFixed(perf.threshold, 3)} ` +
        '(flagged: risk ≥ cut-off).';
  const groups = `${perf.rows.length} group${perf.rows.length === 1 ? '' : 's'}`;
  L.paragraph(
    `The model's apparent performance within each group of "${perf.column}" (${groups}, ` +
      `${formatCount(perf.overall.n)} rows used), with ${levelText(perf.level)} intervals. ${cut} ` +
      perf.conventions.join(' '),
    { size: 9 },
  );
  if (perf.emptyGroups.length > 0)
    L.paragraph(`Groups with none of the rows used: ${perf.emptyGroups.join(', ')}.`, { size: 8.5 });
  const { header, rows } = subgroupTableText(perf, '\n', false);
  const widths = header.length > 7 ? [18, 10, 11, 21, 24, 22, 21, 16, 16, 15] : [32, 14, 14, 28, 28, 30, 28];
  const columns: TableColumn[] = header.map((h, i) => ({
    header: h.replace('Calibration-in-the-large', 'Calibration-in-\nthe-large'),
    width: widths[i],
    align: i === 0 ? 'left' : 'right',
  }));
  L.table(columns, rows, 7);
  forestPlot(
    L,
    FOREST_MEASURES.map((m) => forestData(perf, m)),
  );
  L.subheading('When a subgroup is too small');
  L.paragraph(perf.rule.text, { size: 8.5 });
  for (const w of perf.warnings) L.bullet(`${w.message} ${w.suggestion}`, 8);
  L.paragraph(`How: ${perf.methods.join(' ')}`, { size: 7.5, color: [80, 80, 80] });
}

/** Row labels on the left, then one panel per measure; a row per group and the overall row at the bottom. */
function forestPlot(L: PdfLayout, panels: ForestData[]): void {
  const first = panels[0];
  const rows = [...first.rows, first.overall];
  const rowH = 6.5;
  const labelW = 34;
  const gap = 6;
  const panelW = (L.width - labelW - gap * (panels.length - 1)) / panels.length;
  const h = rows.length * rowH + 5.5;
  L.ensure(h + 22);
  const doc = L.doc;
  const top = L.y + 7;
  doc.setFont(FONT, 'bold');
  doc.setFontSize(9);
  doc.text(`Subgroup estimates of "${first.column}" with ${levelText(first.level)} intervals`, L.left, top - 3);
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  const yOf = (k: number) => top + 2 + (k + 0.5) * rowH + (k === rows.length - 1 ? 1.5 : 0);
  rows.forEach((r, k) => {
    const note = PRECISION_WORDS[r.precision];
    doc.setFont(FONT, k === rows.length - 1 ? 'bold' : 'normal');
    const label = k === rows.length - 1 ? 'All rows' : r.label;
    doc.text(doc.splitTextToSize(label, labelW - 2)[0] as string, L.left, yOf(k) + (note ? 0 : 1));
    if (note) {
      doc.setFontSize(5.5);
      doc.setTextColor(160, 60, 0);
      doc.text(note.split(':')[0], L.left, yOf(k) + 2.4);
      doc.setTextColor(0, 0, 0);
      doc.setFontSize(7);
    }
  });
  doc.setFont(FONT, 'normal');
  panels.forEach((p, j) => {
    const left = L.left + labelW + j * (panelW + gap);
    drawPanel(L, p, left, panelW, top, h, yOf);
  });
  L.y = top + h + 10;
}

function drawPanel(
  L: PdfLayout,
  p: ForestData,
  left: number,
  w: number,
  top: number,
  h: number,
  yOf: (k: number) => number,
): void {
  const doc = L.doc;
  const [lo, hi] = forestDomain(p);
  const x =
    p.scale === 'log'
      ? scaleLog()
          .domain([lo, hi])
          .range([left, left + w])
      : scaleLinear()
          .domain([lo, hi])
          .range([left, left + w]);
  doc.setDrawColor(225, 225, 225);
  doc.setLineWidth(0.15);
  const ticks = p.scale === 'log' ? logTicks(lo, hi) : x.ticks(4);
  doc.setFontSize(6.5);
  for (const t of ticks) {
    doc.line(x(t), top, x(t), top + h);
    doc.text(tickText(t), x(t), top + h + 3, { align: 'center' });
  }
  doc.setDrawColor(60, 60, 60);
  doc.setLineWidth(0.3);
  doc.line(left, top + h, left + w, top + h);
  doc.setFontSize(7.5);
  doc.text(SHORT_TITLE[p.measure] ?? p.title, left + w / 2, top + h + 7, { align: 'center' });
  if (p.reference >= lo && p.reference <= hi) {
    doc.setDrawColor(120, 120, 120);
    doc.setLineDashPattern([1, 0.8], 0);
    doc.line(x(p.reference), top, x(p.reference), top + h);
    doc.setLineDashPattern([], 0);
  }
  const rows = [...p.rows, p.overall];
  rows.forEach((r, k) => {
    const y = yOf(k);
    const overall = k === rows.length - 1;
    const colour: [number, number, number] = overall ? [0, 0, 0] : [0, 114, 178];
    if (r.lower !== null && r.upper !== null && Number.isFinite(r.lower) && Number.isFinite(r.upper)) {
      const a = clampTo(r.lower, lo, hi);
      const b = clampTo(r.upper, lo, hi);
      doc.setDrawColor(...colour);
      doc.setLineWidth(0.4);
      doc.line(x(a), y, x(b), y);
    }
    if (r.estimate !== null && Number.isFinite(r.estimate) && r.estimate >= lo && r.estimate <= hi) {
      doc.setFillColor(...colour);
      if (overall) doc.rect(x(r.estimate) - 0.9, y - 0.9, 1.8, 1.8, 'F');
      else doc.circle(x(r.estimate), y, 0.8, 'F');
    } else if (r.estimate !== null && p.scale === 'log' && r.estimate <= 0) {
      doc.setFontSize(6);
      doc.setTextColor(...colour);
      doc.text(`O/E ${formatFixed(r.estimate, 2)}, left of the log scale`, left + 1, y - 1);
      doc.setTextColor(0, 0, 0);
    } else if (r.estimate === null) {
      doc.setFontSize(6);
      doc.setTextColor(120, 120, 120);
      doc.text('not computed', left + w - 1, y + 0.8, { align: 'right' });
      doc.setTextColor(0, 0, 0);
    }
  });
}

const clampTo = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v));

function logTicks(lo: number, hi: number): number[] {
  const cands = [0.1, 0.2, 0.25, 0.5, 0.75, 1, 1.5, 2, 3, 4, 5, 10, 20];
  const inside = cands.filter((t) => t >= lo && t <= hi);
  return inside.length > 5 ? inside.filter((t) => [0.1, 0.25, 0.5, 1, 2, 4, 10, 20].includes(t)) : inside;
}

const tickText = (t: number) => String(Number(t.toPrecision(3)));
