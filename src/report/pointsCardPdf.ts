import type { jsPDF } from 'jspdf';
import type { PointsRecord } from '../engine/workflow';
import { formatFixed } from './format';
import { FONT, PdfLayout } from './pdfLayout';
import { POINTS_CAUTIONS, pointsCardItems, pointsCasesText, pointsComparisonRows, type CardItem } from './pointsCard';

/** Draws the card's items (mm) on the current page of `doc`. */
export function drawCardItems(doc: jsPDF, items: readonly CardItem[]): void {
  for (const it of items) {
    if (it.kind === 'rect') {
      doc.setFillColor(...it.fill);
      doc.rect(it.x, it.y, it.w, it.h, 'F');
    } else if (it.kind === 'line') {
      doc.setDrawColor(...it.color);
      doc.setLineWidth(it.width);
      doc.line(it.x1, it.y1, it.x2, it.y2);
    } else {
      doc.setFont(FONT, it.bold ? 'bold' : 'normal');
      doc.setFontSize(it.size);
      doc.setTextColor(...(it.color ?? [0, 0, 0]));
      doc.text(it.text, it.x, it.y, it.align === 'right' ? { align: 'right' } : {});
    }
  }
  doc.setTextColor(0, 0, 0);
}

/** The one-page card alone as a PDF (A4, embedded Liberation Sans): the page's "Card as PDF". */
export function buildPointsCardPdf(p: PointsRecord, meta: { fulcraVersion: string; created: string }): Uint8Array {
  const L = new PdfLayout();
  const created = new Date(meta.created);
  if (!Number.isNaN(created.getTime())) L.doc.setCreationDate(created);
  L.doc.setProperties({
    title: `Bedside points score: ${p.score.outcome}`,
    creator: `Fulcra ${meta.fulcraVersion}`,
    subject: 'Bedside points score card (an approximation of a logistic regression model)',
  });
  drawCardItems(L.doc, pointsCardItems(p, { ...meta, footer: true }));
  return new Uint8Array(L.doc.output('arraybuffer'));
}

/**
 * The model summary's section on the points score (when one was built): how it was made, the score beside the
 * full model, the cautions, then the card on a page of its own.
 */
export function pointsSection(
  L: PdfLayout,
  p: PointsRecord | undefined,
  meta: { fulcraVersion: string; created: string },
): void {
  if (!p) return;
  const notes = [
    ...[...p.score.warnings, ...p.evaluation.warnings].map((w) => `${w.message} ${w.suggestion}`),
    ...POINTS_CAUTIONS,
  ];
  // the whole section on one page when it fits on a page (the card follows on its own page)
  L.section('Bedside points score', Math.min(L.bottom - L.top - L.headingHeight, 78 + L.bulletsHeight(notes, 8.5)));
  L.paragraph(
    'Integer points per category or range of each predictor, after Sullivan, Massaro & D\u2019Agostino (2004, ' +
      `Stat Med 23:1631). ${p.score.baseUnit.description} Totals run from ${p.score.minTotal} to ` +
      `${p.score.maxTotal}; the risk of a total is ` +
      `1/(1 + exp(\u2212(${formatFixed(p.score.baseLinearPredictor, 3)} + ` +
      `${formatFixed(p.score.baseUnit.logOdds, 4)} \u00d7 total))). The card is on the next page.`,
  );
  L.paragraph(pointsCasesText(p), { size: 8.5, color: [80, 80, 80] });
  L.table(
    [
      { header: '', width: 74 },
      { header: 'Points card', width: 52, align: 'right' },
      { header: 'Full model', width: 48, align: 'right' },
    ],
    pointsComparisonRows(p),
  );
  for (const n of notes) L.bullet(n, 8.5);
  L.newPage();
  drawCardItems(L.doc, pointsCardItems(p, { ...meta, footer: false }));
  L.setFont(9.5);
  L.y = L.bottom;
}
