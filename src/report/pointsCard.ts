import type { PointsRecord } from '../engine/workflow';
import { DASH, MINUS, formatCount, formatFixed, formatInterval, formatP, levelText } from './format';

/**
 * The printable one-page bedside card of a points score (Sullivan, Massaro & D'Agostino 2004, Stat Med 23:1631),
 * laid out once as positioned items in millimetres on an A4 page: the PDF draws them with jsPDF
 * (`pointsCardPdf.ts`), the page draws them as SVG (its preview, exported to PNG). Pure; no DOM.
 */

/** The cautions printed on the card, on the page and in the model summary beside every points score. */
export const POINTS_CAUTIONS: readonly string[] = [
  'Not a medical device. Fulcra is a statistics workbench; this card has not been assessed by any regulator and ' +
    'must not be used on its own to make decisions about individual patients.',
  'The card is an approximation of the model: predictors are grouped into categories and points are rounded, so ' +
    "a card's risk can differ from the model's own risk; the comparison on the card shows by how much.",
  'Its performance is apparent (on the data the model was fitted on), not external validation. Use follows local ' +
    'governance and does not replace licensed clinical judgement.',
];

export const CARD_WIDTH = 210;
export const CARD_HEIGHT = 297;

export type CardItem =
  | {
      kind: 'text';
      x: number;
      y: number;
      text: string;
      size: number;
      bold?: boolean;
      align?: 'left' | 'right';
      color?: [number, number, number];
    }
  | { kind: 'line'; x1: number; y1: number; x2: number; y2: number; width: number; color: [number, number, number] }
  | { kind: 'rect'; x: number; y: number; w: number; h: number; fill: [number, number, number] };

/** Points with their sign, true minus: "+3", "0", "−2". */
export function pointsText(p: number): string {
  return p > 0 ? `+${p}` : p < 0 ? `${MINUS}${-p}` : '0';
}

/** A card risk: one decimal percent, "< 0.1%" and "> 99.9%" at the ends. */
export function riskText(r: number): string {
  if (!Number.isFinite(r)) return DASH;
  if (r < 0.0005) return '< 0.1%';
  if (r > 0.9995) return '> 99.9%';
  return `${formatFixed(100 * r, 1)}%`;
}

/** The comparison of the score with the full model, as rows [measure, points score, full model] (page, PDF, CLI). */
export function pointsComparisonRows(p: PointsRecord): string[][] {
  const e = p.evaluation;
  const ci = (a: { lower: number | null; upper: number | null }) => formatInterval(a.lower, a.upper, 3);
  const est = (x: { estimate: number } | null) => formatFixed(x?.estimate, 3);
  const d = e.aucDifference;
  return [
    [
      `AUC (${levelText(e.level)} CI, DeLong)`,
      `${formatFixed(e.points.auc.auc, 3)} (${ci(e.points.auc)})`,
      `${formatFixed(e.model.auc.auc, 3)} (${ci(e.model.auc)})`,
    ],
    [
      'AUC difference, score − model (paired DeLong)',
      `${formatFixed(d.difference, 3)} (${ci(d)}), p ${formatP(d.p)}`,
      '',
    ],
    ['Calibration slope', est(e.points.calibration.slope), est(e.model.calibration.slope)],
    [
      'Calibration-in-the-large',
      est(e.points.calibration.interceptInTheLarge),
      est(e.model.calibration.interceptInTheLarge),
    ],
    ['Brier score', formatFixed(e.points.brier.brier, 4), formatFixed(e.model.brier.brier, 4)],
    [
      'Card risk against model risk, percentage points',
      `mean ${formatFixed(100 * e.riskDifference.meanAbsolute, 2)}, largest ` +
        `${formatFixed(100 * e.riskDifference.largest, 1)} (row ${e.riskDifference.largestRow})`,
      '',
    ],
  ];
}

/** One sentence on which cases the comparison counts. */
export function pointsCasesText(p: PointsRecord): string {
  const e = p.evaluation;
  const w = p.weighted ? ` (${formatCount(p.rows)} weighted rows written out one row per case)` : '';
  return (
    `${formatCount(e.n)} cases, ${formatCount(e.events)} events${w}; apparent performance on the rows the model ` +
    'was fitted on.'
  );
}

const MM_PER_PT = 25.4 / 72;

/** Splits text into lines of at most `width` mm at `size` pt (a conservative mean glyph width of Liberation Sans). */
export function wrapText(text: string, width: number, size: number): string[] {
  const perChar = 0.53 * size * MM_PER_PT;
  const max = Math.max(8, Math.floor(width / perChar));
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + word.length > max) {
      out.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) out.push(line);
  return out;
}

interface FlowLine {
  text: string;
  right?: string;
  bold?: boolean;
  /** First line of a block that should start a column rather than split (term blocks). */
  blockStart?: number;
  gapAfter?: boolean;
}

const NAVY: [number, number, number] = [20, 50, 90];
const GREY: [number, number, number] = [90, 90, 90];
const FLOW_TOP = 44;
const FLOW_BOTTOM = 214;
const COLUMNS = [18, 77, 136];
const COLUMN_WIDTH = 55;

/** The lines of the points and risk tables; the risk table keeps every `step`-th total. */
function flowLines(p: PointsRecord, size: number, step: number): FlowLine[] {
  const lines: FlowLine[] = [];
  const labelWidth = COLUMN_WIDTH - 10;
  for (const t of p.score.terms) {
    const block: FlowLine[] = [];
    for (const [k, h] of wrapText(
      t.term === t.column ? t.term : `${t.term} (${t.column})`,
      COLUMN_WIDTH,
      size,
    ).entries())
      block.push({ text: h, bold: true, ...(k === 0 ? { blockStart: 0 } : {}) });
    for (const c of t.categories) {
      const parts = wrapText(c.label, labelWidth, size);
      parts.forEach((part, k) =>
        block.push({ text: part, ...(k === parts.length - 1 ? { right: pointsText(c.points) } : {}) }),
      );
    }
    block[0].blockStart = block.length;
    block[block.length - 1].gapAfter = true;
    lines.push(...block);
  }
  lines.push({ text: 'Total points', right: 'Risk', bold: true, blockStart: 4 });
  const rows = p.score.table.filter((_, i) => i % step === 0 || i === p.score.table.length - 1);
  for (const r of rows) lines.push({ text: pointsText(r.total), right: riskText(r.risk) });
  if (step > 1) {
    const nth = step === 2 ? '2nd' : step === 3 ? '3rd' : `${step}th`;
    const note = `Only every ${nth} total (and the last) fits on the card; the model file holds the full table.`;
    for (const part of wrapText(note, COLUMN_WIDTH, size)) lines.push({ text: part });
  }
  return lines;
}

/** Places the flow lines into the three columns; null when they do not fit. */
function placeFlow(lines: FlowLine[], size: number): CardItem[] | null {
  const lh = size * MM_PER_PT * 1.28;
  const items: CardItem[] = [];
  let col = 0;
  let y = FLOW_TOP;
  for (const l of lines) {
    const need = (l.blockStart ?? 1) * lh;
    if (y + need > FLOW_BOTTOM && y > FLOW_TOP) {
      col += 1;
      y = FLOW_TOP;
    }
    if (col >= COLUMNS.length) return null;
    const x = COLUMNS[col];
    items.push({ kind: 'text', x, y: y + lh * 0.78, text: l.text, size, bold: l.bold });
    if (l.right !== undefined)
      items.push({
        kind: 'text',
        x: x + COLUMN_WIDTH,
        y: y + lh * 0.78,
        text: l.right,
        size,
        bold: l.bold,
        align: 'right',
      });
    if (l.bold && l.right === undefined && l.blockStart !== undefined)
      items.push({ kind: 'line', x1: x, y1: y + lh, x2: x + COLUMN_WIDTH, y2: y + lh, width: 0.2, color: GREY });
    if (l.bold && l.right !== undefined)
      items.push({ kind: 'line', x1: x, y1: y + lh, x2: x + COLUMN_WIDTH, y2: y + lh, width: 0.2, color: GREY });
    y += lh + (l.gapAfter ? lh * 0.6 : 0);
  }
  return items;
}

/**
 * The card as positioned items on an A4 page (mm): title, what one point is, the points of each predictor's
 * categories and the table from total points to risk (in three columns, the type size shrinking to fit, and only
 * past the smallest size every k-th total of the risk table, said so on the card), the score beside the full model,
 * and the cautions. `footer`: Fulcra's version and the date at the foot (the model summary has its own footer).
 */
export function pointsCardItems(
  p: PointsRecord,
  meta: { fulcraVersion: string; created: string; footer?: boolean },
): CardItem[] {
  const s = p.score;
  const items: CardItem[] = [
    { kind: 'text', x: 18, y: 22, text: 'Bedside points score', size: 17, bold: true, color: NAVY },
    { kind: 'text', x: 18, y: 29, text: `Risk of "${s.outcome}" = ${s.event}`, size: 11, bold: true },
    { kind: 'line', x1: 18, y1: 31.5, x2: 192, y2: 31.5, width: 0.3, color: NAVY },
  ];
  let y = 36;
  for (const line of wrapText(
    `${s.baseUnit.description} Add the points of each predictor's row that applies, then read the risk of the ` +
      'total in the last table.',
    174,
    8.5,
  )) {
    items.push({ kind: 'text', x: 18, y, text: line, size: 8.5, color: GREY });
    y += 3.8;
  }
  let flow: CardItem[] | null = null;
  for (const size of [9, 8.5, 8, 7.5, 7, 6.5, 6, 5.5]) {
    flow = placeFlow(flowLines(p, size, 1), size);
    if (flow) break;
  }
  for (let step = 2; !flow; step++) flow = placeFlow(flowLines(p, 5.5, step), 5.5);
  items.push(...flow);

  y = 220;
  items.push({ kind: 'text', x: 18, y, text: 'The card beside the full model', size: 10, bold: true, color: NAVY });
  y += 4.2;
  items.push({ kind: 'text', x: 18, y, text: pointsCasesText(p), size: 7.5, color: GREY });
  y += 4.6;
  const cols = [18, 112, 156];
  items.push({ kind: 'rect', x: 18, y: y - 3.2, w: 174, h: 4.4, fill: [232, 238, 246] });
  ['', 'Points card', 'Full model'].forEach((h, j) =>
    items.push({ kind: 'text', x: cols[j], y, text: h, size: 7.5, bold: true }),
  );
  y += 4.2;
  for (const row of pointsComparisonRows(p)) {
    row.forEach((c, j) => items.push({ kind: 'text', x: cols[j], y, text: c, size: 7.5 }));
    y += 3.7;
  }
  y += 1.5;
  const cautionLines = POINTS_CAUTIONS.flatMap((c) => wrapText(c, 168, 7.2).map((l, k) => ({ l, first: k === 0 })));
  const boxH = cautionLines.length * 3.3 + 3;
  items.push({ kind: 'rect', x: 18, y, w: 174, h: boxH, fill: [253, 243, 224] });
  y += 3.6;
  for (const { l, first } of cautionLines) {
    if (first) items.push({ kind: 'text', x: 20, y, text: '\u2022', size: 7.2 });
    items.push({ kind: 'text', x: 23.5, y, text: l, size: 7.2 });
    y += 3.3;
  }
  if (meta.footer) {
    const date = new Date(meta.created);
    const day = Number.isNaN(date.getTime()) ? meta.created : date.toISOString().slice(0, 10);
    items.push({
      kind: 'text',
      x: 18,
      y: 289,
      text: `Fulcra ${meta.fulcraVersion} \u00b7 bedside points score \u00b7 ${day}`,
      size: 7.5,
      color: GREY,
    });
  }
  return items;
}
