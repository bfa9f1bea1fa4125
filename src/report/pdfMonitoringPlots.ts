/**
 * The monitoring plots drawn as vectors with jsPDF (funnel, CUSUM, cumulative O − E, drift by period) from the
 * engine's MonitoringRecord: the same plain data the page draws. Paths arrive already decimated by the engine
 * (min/max per bucket, for drawing only); nothing here computes a statistic.
 */
import type { jsPDF } from 'jspdf';
import { scaleLinear, scaleLog, scaleUtc, type ScaleLinear } from 'd3';
import type { CusumChart, MonitoringFunnel, MonitoringPeriodRow, MonitoringVlad } from '../engine/monitoring';
import { FONT } from './pdfLayout';
import { formatFixed, formatPlain } from './format';

type Rgb = [number, number, number];
const BLUE: Rgb = [0, 114, 178];
const VERMILLION: Rgb = [213, 94, 0];
const GREEN: Rgb = [0, 158, 115];
const GREY: Rgb = [120, 120, 120];
const ORANGE: Rgb = [230, 159, 0];
const PURPLE: Rgb = [204, 121, 167];

interface Box {
  left: number;
  top: number;
  w: number;
  h: number;
}

const DAY = 86_400_000;
const toDate = (epochDay: number): Date => new Date(epochDay * DAY);

function title(doc: jsPDF, b: Box, text: string): void {
  doc.setFont(FONT, 'bold');
  doc.setFontSize(9);
  doc.setTextColor(0, 0, 0);
  doc.text(text, b.left, b.top - 3);
}

/** Grid, box, ticks and axis labels; `xTicks`/`yTicks` are [position in mm, label] pairs. */
function axes(
  doc: jsPDF,
  b: Box,
  xTicks: [number, string][],
  yTicks: [number, string][],
  xLabel: string,
  yLabel: string,
): void {
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  doc.setDrawColor(225, 225, 225);
  doc.setLineWidth(0.15);
  for (const [x, label] of xTicks) {
    doc.line(x, b.top, x, b.top + b.h);
    doc.text(label, x, b.top + b.h + 3.2, { align: 'center' });
  }
  for (const [y, label] of yTicks) {
    doc.line(b.left, y, b.left + b.w, y);
    doc.text(label, b.left - 1.2, y + 1, { align: 'right' });
  }
  doc.setDrawColor(60, 60, 60);
  doc.setLineWidth(0.3);
  doc.rect(b.left, b.top, b.w, b.h, 'S');
  doc.setFontSize(8);
  doc.text(xLabel, b.left + b.w / 2, b.top + b.h + 7.5, { align: 'center' });
  doc.text(yLabel, b.left - 9, b.top + b.h / 2, { align: 'center', angle: 90 });
}

function decimals(ticks: number[]): number {
  const step = ticks.length > 1 ? Math.abs(ticks[1] - ticks[0]) : 1;
  return Math.max(0, Math.min(4, -Math.floor(Math.log10(step) + 1e-9)));
}

/** A polyline of points already in mm; non-finite points break the line. */
function path(doc: jsPDF, pts: [number, number][], color: Rgb, width: number, dash?: number[]): void {
  doc.setDrawColor(...color);
  doc.setLineWidth(width);
  if (dash) doc.setLineDashPattern(dash, 0);
  let open = false;
  for (const [x, y] of pts) {
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      if (open) doc.stroke();
      open = false;
      continue;
    }
    if (!open) doc.moveTo(x, y);
    else doc.lineTo(x, y);
    open = true;
  }
  if (open) doc.stroke();
  if (dash) doc.setLineDashPattern([], 0);
}

/** Labelled ticks of a linear y scale, with as many decimals as their spacing needs. */
function yLabels(y: ScaleLinear<number, number>, count: number): [number, string][] {
  const yt = y.ticks(count);
  return yt.map((t) => [y(t), formatFixed(t, decimals(yt))]);
}

/** A horizontal line across the plot box at height `at` (a reference value or a control limit). */
function across(doc: jsPDF, b: Box, at: number, color: Rgb, width: number, dash?: number[]): void {
  path(
    doc,
    [
      [b.left, at],
      [b.left + b.w, at],
    ],
    color,
    width,
    dash,
  );
}

function legend(
  doc: jsPDF,
  x: number,
  y: number,
  items: { label: string; color: Rgb; dash?: number[]; dot?: boolean }[],
) {
  doc.setFont(FONT, 'normal');
  doc.setFontSize(7);
  items.forEach((it, i) => {
    const yy = y + i * 3.4;
    if (it.dot) {
      doc.setFillColor(...it.color);
      doc.circle(x + 3, yy, 0.8, 'F');
    } else {
      doc.setDrawColor(...it.color);
      doc.setLineWidth(0.5);
      if (it.dash) doc.setLineDashPattern(it.dash, 0);
      doc.line(x, yy, x + 6, yy);
      if (it.dash) doc.setLineDashPattern([], 0);
    }
    doc.text(it.label, x + 7.5, yy + 1);
  });
}

const clamp = (v: number, lo: number, hi: number): number => Math.min(hi, Math.max(lo, v));

/** The funnel plot: each unit's O/E against its expected count (log scale), the exact limits, outliers named. */
export function drawFunnel(doc: jsPDF, b: Box, f: MonitoringFunnel, useAdjusted: boolean): void {
  title(doc, b, 'Funnel plot: O/E by unit against expected events');
  const curves = useAdjusted && f.overdispersion?.applied ? f.overdispersion.curves : f.curves;
  const es = [...curves.expected, ...f.units.map((u) => u.expected)].filter((e) => e > 0 && Number.isFinite(e));
  const eMin = Math.max(0.1, Math.min(...es));
  const eMax = Math.max(eMin * 10, ...es);
  const oes = f.units.map((u) => u.oe.estimate).filter((v): v is number => v !== null && Number.isFinite(v));
  const yMax = Math.min(6, Math.max(2, ...oes.map((v) => v * 1.1)));
  const x = scaleLog()
    .domain([eMin, eMax])
    .range([b.left, b.left + b.w])
    .clamp(true);
  const y = scaleLinear()
    .domain([0, yMax])
    .range([b.top + b.h, b.top])
    .clamp(true);
  const xt = x.ticks(5).filter((t) => [1, 2, 5].includes(Number(t.toExponential(0).split('e')[0])));
  axes(
    doc,
    b,
    xt.map((t) => [x(t), formatPlain(t, 3)]),
    yLabels(y, 5),
    'Expected events (log scale)',
    'O/E',
  );
  const line = (ys: number[]) =>
    curves.expected.map((e, i): [number, number] => [x(e), Number.isFinite(ys[i]) ? y(clamp(ys[i], 0, yMax)) : NaN]);
  across(doc, b, y(1), GREY, 0.3);
  path(doc, line(curves.innerLower), BLUE, 0.4, [1.2, 0.8]);
  path(doc, line(curves.innerUpper), BLUE, 0.4, [1.2, 0.8]);
  path(doc, line(curves.outerLower), VERMILLION, 0.5);
  path(doc, line(curves.outerUpper), VERMILLION, 0.5);
  doc.setFontSize(6.5);
  for (const u of f.units) {
    if (u.oe.estimate === null || !(u.expected > 0)) continue;
    const flag = useAdjusted && u.adjustedFlag ? u.adjustedFlag : u.flag;
    const out = flag === 'above-outer' || flag === 'below-outer';
    const px = x(u.expected);
    const py = y(clamp(u.oe.estimate, 0, yMax));
    doc.setFillColor(...(out ? VERMILLION : BLUE));
    doc.circle(px, py, out ? 1 : 0.7, 'F');
    if (out) {
      doc.setTextColor(...VERMILLION);
      doc.text(u.unit, px + 1.6, py - 1);
      doc.setTextColor(0, 0, 0);
    }
  }
  const [inner, outer] = f.levels.map((l) => `${formatPlain(100 * l, 4)}% limits`);
  legend(doc, b.left + b.w - 34, b.top + 3.5, [
    { label: inner, color: BLUE, dash: [1.2, 0.8] },
    { label: outer, color: VERMILLION },
    { label: 'unit', color: BLUE, dot: true },
  ]);
}

/** Date axis ticks over [d0, d1] epoch days. */
function dateTicks(
  d0: number,
  d1: number,
  left: number,
  right: number,
): { x: (d: number) => number; ticks: [number, string][] } {
  const s = scaleUtc()
    .domain([toDate(d0), toDate(Math.max(d1, d0 + 1))])
    .range([left, right]);
  const fmt = s.tickFormat(5, '%b %Y');
  return { x: (d) => s(toDate(d)), ticks: s.ticks(5).map((t) => [s(t), fmt(t)]) };
}

/** One risk-adjusted CUSUM: its path by date, the limit h (or −h), the signals marked. */
export function drawCusum(doc: jsPDF, b: Box, c: CusumChart, range: [number, number]): void {
  const worse = c.direction === 'deteriorate';
  title(
    doc,
    b,
    worse
      ? `CUSUM for deterioration (odds × ${formatPlain(c.oddsRatio, 3)})`
      : `CUSUM for improvement (odds × ${formatPlain(c.oddsRatio, 3)})`,
  );
  const vals = c.path.value.filter(Number.isFinite);
  const span = Math.max(c.h * 1.15, ...vals.map(Math.abs));
  const dom: [number, number] = worse ? [0, span] : [-span, 0];
  const y = scaleLinear()
    .domain(dom)
    .range([b.top + b.h, b.top]);
  const { x, ticks } = dateTicks(range[0], range[1], b.left, b.left + b.w);
  axes(doc, b, ticks, yLabels(y, 4), 'Date', 'CUSUM');
  const limit = worse ? c.h : -c.h;
  across(doc, b, y(limit), VERMILLION, 0.4, [1.5, 1]);
  path(
    doc,
    c.path.date.map((d, i): [number, number] => [x(d), y(c.path.value[i])]),
    worse ? BLUE : GREEN,
    0.35,
  );
  doc.setFillColor(...VERMILLION);
  for (const s of c.signals) doc.circle(x(s.date), y(limit), 0.9, 'F');
  doc.setFontSize(7);
  doc.setTextColor(...VERMILLION);
  doc.text(`h = ${formatFixed(c.h, 2)}`, b.left + b.w - 1, y(limit) + (worse ? -1 : 3), { align: 'right' });
  doc.setTextColor(0, 0, 0);
}

/** Cumulative O − E case by case, by date. */
export function drawVlad(doc: jsPDF, b: Box, v: MonitoringVlad, range: [number, number]): void {
  title(doc, b, 'Cumulative observed minus expected events');
  const vals = v.path.value.filter(Number.isFinite);
  const lo = Math.min(0, ...vals);
  const hi = Math.max(0, ...vals);
  const pad = Math.max(1, 0.08 * (hi - lo));
  const y = scaleLinear()
    .domain([lo - pad, hi + pad])
    .range([b.top + b.h, b.top]);
  const { x, ticks } = dateTicks(range[0], range[1], b.left, b.left + b.w);
  axes(doc, b, ticks, yLabels(y, 4), 'Date', 'O \u2212 E');
  across(doc, b, y(0), GREY, 0.3);
  path(
    doc,
    v.path.date.map((d, i): [number, number] => [x(d), y(v.path.value[i])]),
    PURPLE,
    0.4,
  );
}

/** O/E by period with its exact interval (and the line at 1): calibration drift over time. */
export function drawDrift(doc: jsPDF, b: Box, periods: MonitoringPeriodRow[]): void {
  title(doc, b, 'Calibration drift: O/E by period');
  const ups = periods.map((p) => p.oe.upper).filter((v): v is number => v !== null && Number.isFinite(v));
  const yMax = Math.min(5, Math.max(1.5, ...ups.map((v) => v * 1.05)));
  const y = scaleLinear()
    .domain([0, yMax])
    .range([b.top + b.h, b.top])
    .clamp(true);
  const n = periods.length;
  const step = b.w / Math.max(1, n);
  const xAt = (i: number) => b.left + step * (i + 0.5);
  const every = Math.max(1, Math.ceil(n / 8));
  axes(
    doc,
    b,
    periods.flatMap((p, i): [number, string][] => (i % every === 0 ? [[xAt(i), p.label]] : [])),
    yLabels(y, 5),
    'Period',
    'O/E',
  );
  across(doc, b, y(1), GREY, 0.3, [1.2, 1.2]);
  periods.forEach((p, i) => {
    const cx = xAt(i);
    if (p.oe.lower !== null && p.oe.upper !== null)
      path(
        doc,
        [
          [cx, y(p.oe.lower)],
          [cx, y(Math.min(p.oe.upper, yMax))],
        ],
        ORANGE,
        0.5,
      );
    if (p.oe.estimate !== null) {
      doc.setFillColor(...BLUE);
      doc.circle(cx, y(Math.min(p.oe.estimate, yMax)), 0.8, 'F');
    }
  });
}
