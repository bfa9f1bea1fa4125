import type { jsPDF } from 'jspdf';
import { scaleLinear, type ScaleLinear } from 'd3';
import { FONT } from './pdfLayout';
import { formatFixed } from './format';
import type { CalibrationPlotData, DecisionCurvePlotData, RocPlotData } from './reportInput';

interface Frame {
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
}

type Rgb = [number, number, number];
const BLUE: Rgb = [31, 90, 160];
const GREY: Rgb = [120, 120, 120];
const BAND: Rgb = [205, 220, 240];
const ORANGE: Rgb = [200, 110, 30];

/**
 * Axes, ticks and labels in the box (left, top, size × size mm); returns the scales mapping data to mm.
 * Vector only (jsPDF lines and text), drawn from the same plain plot data the workbench uses.
 */
function frame(
  doc: jsPDF,
  left: number,
  top: number,
  w: number,
  h: number,
  xDomain: [number, number],
  yDomain: [number, number],
  xLabel: string,
  yLabel: string,
  title: string,
): Frame {
  const x = scaleLinear()
    .domain(xDomain)
    .range([left, left + w]);
  const y = scaleLinear()
    .domain(yDomain)
    .range([top + h, top]);
  doc.setFont(FONT, 'bold');
  doc.setFontSize(9);
  doc.text(title, left, top - 3);
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  doc.setDrawColor(225, 225, 225);
  doc.setLineWidth(0.15);
  for (const t of x.ticks(5)) {
    doc.line(x(t), top, x(t), top + h);
    doc.text(formatFixed(t, decimals(x.ticks(5))), x(t), top + h + 3.2, { align: 'center' });
  }
  for (const t of y.ticks(5)) {
    doc.line(left, y(t), left + w, y(t));
    doc.text(formatFixed(t, decimals(y.ticks(5))), left - 1.2, y(t) + 1, { align: 'right' });
  }
  doc.setDrawColor(60, 60, 60);
  doc.setLineWidth(0.3);
  doc.rect(left, top, w, h, 'S');
  doc.setFontSize(8);
  doc.text(xLabel, left + w / 2, top + h + 7.5, { align: 'center' });
  doc.text(yLabel, left - 9, top + h / 2, { align: 'center', angle: 90 });
  return { x, y };
}

function decimals(ticks: number[]): number {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : 1;
  return Math.max(0, Math.min(4, -Math.floor(Math.log10(step) + 1e-9)));
}

/** Keeps a polyline's shape while limiting it to about `max` points (uniform thinning; ends kept). */
export function thin(xs: number[], ys: number[], max = 600): [number[], number[]] {
  if (xs.length <= max) return [xs, ys];
  const step = (xs.length - 1) / (max - 1);
  const ox: number[] = [];
  const oy: number[] = [];
  for (let k = 0; k < max; k++) {
    const i = Math.round(k * step);
    ox.push(xs[i]);
    oy.push(ys[i]);
  }
  return [ox, oy];
}

function polyline(doc: jsPDF, f: Frame, xs: number[], ys: number[], color: Rgb, width: number, dash?: number[]): void {
  const [tx, ty] = thin(xs, ys);
  let started = false;
  doc.setDrawColor(...color);
  doc.setLineWidth(width);
  if (dash) doc.setLineDashPattern(dash, 0);
  for (let i = 0; i < tx.length; i++) {
    if (!Number.isFinite(tx[i]) || !Number.isFinite(ty[i])) continue;
    const px = f.x(clamp(tx[i], f.x.domain()));
    const py = f.y(clamp(ty[i], f.y.domain()));
    if (!started) {
      doc.moveTo(px, py);
      started = true;
    } else doc.lineTo(px, py);
  }
  if (started) doc.stroke();
  if (dash) doc.setLineDashPattern([], 0);
}

function clamp(v: number, domain: number[]): number {
  return Math.min(Math.max(v, domain[0]), domain[1]);
}

function legend(
  doc: jsPDF,
  x: number,
  y: number,
  items: { label: string; color: Rgb; dash?: number[]; dot?: boolean }[],
): void {
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  items.forEach((it, i) => {
    const yy = y + i * 3.6;
    if (it.dot) {
      doc.setFillColor(...it.color);
      doc.circle(x + 3, yy, 0.7, 'F');
      doc.text(it.label, x + 7.5, yy + 1);
      return;
    }
    doc.setDrawColor(...it.color);
    doc.setLineWidth(0.5);
    if (it.dash) doc.setLineDashPattern(it.dash, 0);
    doc.line(x, yy, x + 6, yy);
    if (it.dash) doc.setLineDashPattern([], 0);
    doc.text(it.label, x + 7.5, yy + 1);
  });
}

export function drawRoc(doc: jsPDF, left: number, top: number, size: number, data: RocPlotData): void {
  const f = frame(doc, left, top, size, size, [0, 1], [0, 1], '1 \u2212 specificity', 'Sensitivity', 'ROC curve');
  polyline(doc, f, [0, 1], [0, 1], GREY, 0.3, [1.2, 1.2]);
  polyline(doc, f, data.fpr, data.tpr, BLUE, 0.6);
  if (data.auc !== undefined) {
    doc.setFontSize(8);
    doc.setTextColor(...BLUE);
    doc.text(`AUC ${formatFixed(data.auc, 3)}`, f.x(0.97), f.y(0.05), { align: 'right' });
    doc.setTextColor(0, 0, 0);
  }
}

/** A corner of a plot's area, where a legend can sit. */
export type Corner = 'top-left' | 'bottom-right' | 'top-right' | 'bottom-left';
const CORNERS: Corner[] = ['top-left', 'bottom-right', 'top-right', 'bottom-left'];

/**
 * The corner where a legend box of `w` × `h` (fractions of the plot's width and height) covers the least of the
 * data: each corner's box is sampled on a 9 × 5 grid of points in data units and `covered(x, y)` counts the ones
 * that would hide something (a curve, a band, a point). Ties go to the earlier corner in top-left, bottom-right,
 * top-right, bottom-left order.
 */
export function freeCorner(
  xDomain: [number, number],
  yDomain: [number, number],
  w: number,
  h: number,
  covered: (x: number, y: number) => boolean,
): Corner {
  const [x0, x1] = xDomain;
  const [y0, y1] = yDomain;
  let best: Corner = CORNERS[0];
  let bestScore = Infinity;
  for (const c of CORNERS) {
    const left = c.endsWith('left') ? x0 : x1 - w * (x1 - x0);
    const bottom = c.startsWith('bottom') ? y0 : y1 - h * (y1 - y0);
    let score = 0;
    for (let i = 0; i <= 8; i++)
      for (let j = 0; j <= 4; j++)
        if (covered(left + (i / 8) * w * (x1 - x0), bottom + (j / 4) * h * (y1 - y0))) score++;
    if (score < bestScore) [best, bestScore] = [c, score];
  }
  return best;
}

/** Linear interpolation of the polyline (xs, ys) at x; NaN outside its x-range. xs need not be sorted. */
function interpolate(xs: number[], ys: number[], x: number): number {
  let lo = -Infinity;
  let hi = Infinity;
  let yLo = NaN;
  let yHi = NaN;
  for (let i = 0; i < xs.length; i++) {
    if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i])) continue;
    if (xs[i] <= x && xs[i] > lo) [lo, yLo] = [xs[i], ys[i]];
    if (xs[i] >= x && xs[i] < hi) [hi, yHi] = [xs[i], ys[i]];
  }
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return NaN;
  return hi === lo ? yLo : yLo + ((yHi - yLo) * (x - lo)) / (hi - lo);
}

/** Legend box of `items` lines in mm (width, height), as drawn by `legend`. */
const legendBox = (items: number, width: number): [number, number] => [width, items * 3.6 + 1.5];

/**
 * The calibration plot's common axis range [0, hi] and legend corner. `hi` covers the predicted risks, the
 * observed curve, its band and the grouped points (rounded up to a tenth, at most 1), so nothing is clipped flat;
 * the legend goes to the corner that hides least of the curve, band, diagonal and points.
 */
export function calibrationFrame(
  data: CalibrationPlotData,
  size = 70,
): { hi: number; corner: Corner; legendItems: number } {
  const finite = (xs: number[] | undefined): number[] => (xs ?? []).filter(Number.isFinite);
  const maxVal = Math.max(
    0.05,
    ...finite(data.predicted),
    ...finite(data.observed),
    ...finite(data.upper),
    ...(data.groups ?? []).flatMap((g) => finite([g.predicted, g.observed])),
  );
  const hi = Math.min(1, Math.ceil(maxVal * 10 - 1e-9) / 10);
  const legendItems = data.groups && data.groups.length > 0 ? 3 : 2;
  const [bw, bh] = legendBox(legendItems, 40);
  const near = 0.04 * hi;
  const band = data.lower && data.upper && data.lower.length === data.predicted.length;
  const covered = (x: number, y: number): boolean => {
    if (Math.abs(y - x) < near) return true;
    if (Math.abs(interpolate(data.predicted, data.observed, x) - y) < near) return true;
    if (
      band &&
      interpolate(data.predicted, data.lower!, x) - near <= y &&
      y <= interpolate(data.predicted, data.upper!, x) + near
    )
      return true;
    return (data.groups ?? []).some((g) => Math.abs(g.predicted - x) < near && Math.abs(g.observed - y) < near);
  };
  return { hi, corner: freeCorner([0, hi], [0, hi], (bw + 4) / size, (bh + 4) / size, covered), legendItems };
}

/** The top-left point (mm) of a legend box of `bw` × `bh` mm placed in `corner` of the plot area. */
function legendAt(
  corner: Corner,
  left: number,
  top: number,
  w: number,
  h: number,
  bw: number,
  bh: number,
): [number, number] {
  const x = corner.endsWith('left') ? left + 2 : left + w - bw - 2;
  const y = corner.startsWith('top') ? top + 3 : top + h - bh + 0.5;
  return [x, y];
}

export function drawCalibration(doc: jsPDF, left: number, top: number, size: number, data: CalibrationPlotData): void {
  const { hi, corner, legendItems } = calibrationFrame(data, size);
  const f = frame(doc, left, top, size, size, [0, hi], [0, hi], 'Predicted risk', 'Observed risk', 'Calibration');
  if (data.lower && data.upper && data.lower.length === data.predicted.length) {
    const [px, lo] = thin(data.predicted, data.lower, 300);
    const [, up] = thin(data.predicted, data.upper, 300);
    const pts: [number, number][] = [];
    px.forEach((p, i) => pts.push([f.x(clamp(p, [0, hi])), f.y(clamp(up[i], [0, hi]))]));
    for (let i = px.length - 1; i >= 0; i--) pts.push([f.x(clamp(px[i], [0, hi])), f.y(clamp(lo[i], [0, hi]))]);
    const ok = pts.filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
    if (ok.length > 2) {
      doc.setFillColor(...BAND);
      doc.moveTo(ok[0][0], ok[0][1]);
      for (let i = 1; i < ok.length; i++) doc.lineTo(ok[i][0], ok[i][1]);
      doc.close();
      doc.fill();
    }
  }
  polyline(doc, f, [0, hi], [0, hi], GREY, 0.3, [1.2, 1.2]);
  polyline(doc, f, data.predicted, data.observed, BLUE, 0.6);
  doc.setFillColor(...ORANGE);
  for (const g of data.groups ?? []) {
    if (g.predicted <= hi && g.observed <= hi) doc.circle(f.x(g.predicted), f.y(g.observed), 0.7, 'F');
  }
  const items: { label: string; color: Rgb; dash?: number[]; dot?: boolean }[] = [
    { label: 'flexible calibration curve', color: BLUE },
    { label: 'ideal', color: GREY, dash: [1.2, 1.2] },
  ];
  if (legendItems === 3) items.push({ label: 'groups by tenths of risk', color: ORANGE, dot: true });
  const [bw, bh] = legendBox(items.length, 40);
  const [lx, ly] = legendAt(corner, left, top, size, size, bw, bh);
  legend(doc, lx, ly, items);
}

export function drawDecisionCurve(
  doc: jsPDF,
  left: number,
  top: number,
  w: number,
  h: number,
  data: DecisionCurvePlotData,
): void {
  const finite = [...data.model, ...data.treatAll].filter(Number.isFinite);
  const yMax = Math.max(0.01, ...finite);
  const yMin = -0.25 * yMax;
  const xMax = Math.max(...data.thresholds.filter(Number.isFinite), 0.01);
  const f = frame(
    doc,
    left,
    top,
    w,
    h,
    [0, xMax],
    [yMin, yMax],
    'Threshold probability',
    'Net benefit',
    'Decision curve',
  );
  polyline(doc, f, [0, xMax], [0, 0], GREY, 0.4);
  polyline(doc, f, data.thresholds, data.treatAll, ORANGE, 0.45, [1.5, 1]);
  polyline(doc, f, data.thresholds, data.model, BLUE, 0.6);
  const [bw, bh] = legendBox(3, 24);
  const near = 0.04 * (yMax - yMin);
  const covered = (x: number, y: number): boolean =>
    Math.abs(y) < near ||
    Math.abs(interpolate(data.thresholds, data.model, x) - y) < near ||
    Math.abs(interpolate(data.thresholds, data.treatAll, x) - y) < near;
  const corner = freeCorner([0, xMax], [yMin, yMax], (bw + 4) / w, (bh + 4) / h, covered);
  const [lx, ly] = legendAt(corner, left, top, w, h, bw, bh);
  legend(doc, lx, ly, [
    { label: 'model', color: BLUE },
    { label: 'treat all', color: ORANGE, dash: [1.5, 1] },
    { label: 'treat none', color: GREY },
  ]);
}
