import { scaleLinear } from 'd3';
import type { FlagTable, ModelComparison } from '../engine/comparison';
import { DASH, formatFixed, formatInterval, formatP, formatPercent, levelText } from './format';
import { FONT, type PdfLayout } from './pdfLayout';
import { f3, f4, lrTestText } from './comparisonText';

/**
 * "Comparison of two models": the record made on the page (engine/comparison compareModels via
 * workflow/compareStep): nesting and the likelihood-ratio test, AUC with the paired DeLong test, Brier and
 * calibration of each, a plot of the net-benefit difference across thresholds, the reclassification tables at the
 * cut-off with the NRI caution, and the comparison's warnings.
 */
export function comparisonSection(L: PdfLayout, c: ModelComparison | undefined): void {
  if (!c) return;
  L.section('Comparison of two models');
  L.keyValues(
    [
      ['A', `${c.a.label} \u2014 ${c.a.terms.join(', ')} (${c.a.method})`],
      ['B', `${c.b.label} \u2014 ${c.b.terms.join(', ')} (${c.b.method})`],
    ],
    8,
    9,
  );
  L.paragraph(
    `Both on the same ${c.n} rows (${c.events} events, ${c.nonEvents} non-events); apparent performance on the ` +
      'rows they were fitted on. Every difference is B minus A.',
    { size: 9 },
  );
  L.paragraph(c.nesting.explanation, { size: 9 });
  L.paragraph(lrTestText(c), { size: 9, bold: true });
  if (c.nesting.aicDifference !== null || c.nesting.bicDifference !== null)
    L.paragraph(
      `AIC difference ${formatFixed(c.nesting.aicDifference, 2)}, BIC difference ` +
        `${formatFixed(c.nesting.bicDifference, 2)} (lower is better).`,
      { size: 9 },
    );
  const lv = levelText(c.level);
  const cal = (k: 'a' | 'b', which: 'interceptInTheLarge' | 'slope') => {
    const e = c.calibration[k][which];
    return e ? `${f3(e.estimate)} (${formatInterval(e.lower, e.upper, 3)})` : DASH;
  };
  const d = c.auc.difference;
  const bd = c.brier.difference;
  L.table(
    [
      { header: 'Measure', width: 38 },
      { header: 'A', width: 34, align: 'right' },
      { header: 'B', width: 34, align: 'right' },
      { header: `Difference (${lv} CI)`, width: 48, align: 'right' },
      { header: 'p', width: 20, align: 'right' },
    ],
    [
      [
        `AUC (${lv} CI, DeLong)`,
        `${f3(c.auc.a.auc)} (${formatInterval(c.auc.a.lower, c.auc.a.upper, 3)})`,
        `${f3(c.auc.b.auc)} (${formatInterval(c.auc.b.lower, c.auc.b.upper, 3)})`,
        `${f3(d.difference)} (${formatInterval(d.lower, d.upper, 3)})`,
        formatP(d.p),
      ],
      [
        'Brier score',
        f4(c.brier.a.brier),
        f4(c.brier.b.brier),
        `${f4(bd.estimate)} (${formatInterval(bd.lower, bd.upper, 4)})`,
        formatP(bd.p),
      ],
      ['Calibration-in-the-large', cal('a', 'interceptInTheLarge'), cal('b', 'interceptInTheLarge'), DASH, DASH],
      ['Calibration slope', cal('a', 'slope'), cal('b', 'slope'), DASH, DASH],
    ],
    8,
  );
  L.paragraph(`AUC difference: paired DeLong test (DeLong et al. 1988, Biometrics 44:837). Brier: ${bd.method}.`, {
    size: 8,
    color: [80, 80, 80],
  });
  netBenefitPlot(L, c);
  reclassificationTables(L, c);
  for (const w of c.warnings) L.bullet(`${w.message} ${w.suggestion}`, 8.5);
}

function netBenefitPlot(L: PdfLayout, c: ModelComparison): void {
  const nb = c.netBenefit;
  const w = 140,
    h = 45;
  L.ensure(h + 22);
  const top = L.y + 6;
  const left = L.left + 14;
  const doc = L.doc;
  const ys = nb.difference.filter(Number.isFinite);
  const span = Math.max(0.005, ...ys.map(Math.abs));
  const x = scaleLinear()
    .domain([0, 1])
    .range([left, left + w]);
  const y = scaleLinear()
    .domain([-span * 1.1, span * 1.1])
    .range([top + h, top])
    .nice();
  doc.setFont(FONT, 'bold');
  doc.setFontSize(9);
  doc.text('Net benefit of B minus A, by threshold probability', left, top - 2);
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  doc.setDrawColor(225, 225, 225);
  doc.setLineWidth(0.15);
  const yt = y.ticks(4);
  const yd = Math.max(0, Math.min(4, -Math.floor(Math.log10(Math.abs((yt[1] ?? 1) - (yt[0] ?? 0))) + 1e-9)));
  for (const t of yt) {
    doc.line(left, y(t), left + w, y(t));
    doc.text(formatFixed(t, yd), left - 1.2, y(t) + 1, { align: 'right' });
  }
  for (const t of x.ticks(5)) {
    doc.line(x(t), top, x(t), top + h);
    doc.text(formatFixed(t, 1), x(t), top + h + 3.2, { align: 'center' });
  }
  doc.setDrawColor(90, 90, 90);
  doc.setLineWidth(0.35);
  doc.line(left, y(0), left + w, y(0));
  doc.setDrawColor(31, 90, 160);
  doc.setLineWidth(0.6);
  let prev: [number, number] | null = null;
  nb.thresholds.forEach((t, k) => {
    const v = nb.difference[k];
    if (!Number.isFinite(v)) return void (prev = null);
    const p: [number, number] = [x(t), y(v)];
    if (prev) doc.line(prev[0], prev[1], p[0], p[1]);
    prev = p;
  });
  const r = c.reclassification;
  if (r) {
    doc.setDrawColor(200, 110, 30);
    doc.setLineDashPattern([1.2, 1], 0);
    doc.line(x(r.threshold), top, x(r.threshold), top + h);
    doc.setLineDashPattern([], 0);
    doc.text('cut-off', x(r.threshold) + 1, top + 3);
  }
  doc.setDrawColor(60, 60, 60);
  doc.setLineWidth(0.3);
  doc.rect(left, top, w, h, 'S');
  doc.setFontSize(8);
  doc.text('Threshold probability', left + w / 2, top + h + 7.5, { align: 'center' });
  doc.text('B \u2212 A', left - 11, top + h / 2, { align: 'center', angle: 90 });
  L.y = top + h + 10;
  L.paragraph(
    `Above 0: B gives more net benefit at that threshold (Vickers & Elkin 2006, Med Decis Making ` +
      '26:565); net benefit is in true positives per patient, after subtracting false positives weighted by the ' +
      'odds of the threshold.',
    { size: 8, color: [80, 80, 80] },
  );
}

function flagRows(t: FlagTable): string[][] {
  return [
    ['Flagged by A', String(t.both), String(t.aOnly), String(t.both + t.aOnly)],
    ['Not flagged by A', String(t.bOnly), String(t.neither), String(t.bOnly + t.neither)],
    ['Total', String(t.both + t.bOnly), String(t.aOnly + t.neither), String(t.total)],
  ];
}

function reclassificationTables(L: PdfLayout, c: ModelComparison): void {
  const r = c.reclassification;
  if (!r) return;
  L.subheading(`Who changes side of the cut-off ${formatPercent(r.threshold)}`);
  L.paragraph(r.flagRule, { size: 8.5 });
  const columns = [
    { header: '', width: 52 },
    { header: 'Flagged by B', width: 34, align: 'right' as const },
    { header: 'Not flagged by B', width: 34, align: 'right' as const },
    { header: 'Total', width: 20, align: 'right' as const },
  ];
  for (const [title, t] of [
    ['Events', r.events],
    ['Non-events', r.nonEvents],
  ] as const) {
    L.paragraph(`${title} (${t.total})`, { size: 9, bold: true, gap: 0.5 });
    L.table(columns, flagRows(t), 8);
  }
  L.paragraph(
    `NRI ${f3(r.nri)}: events ${f3(r.eventNri)} (change in sensitivity), non-events ${f3(r.nonEventNri)} (change ` +
      'in specificity).' +
      (r.costPer100
        ? ` Expected cost per 100 cases: ${formatFixed(r.costPer100.a, 1)} (A) and ` +
          `${formatFixed(r.costPer100.b, 1)} (B).`
        : ''),
    { size: 9 },
  );
  L.paragraph(r.caution, { size: 8, color: [160, 60, 0] });
}
