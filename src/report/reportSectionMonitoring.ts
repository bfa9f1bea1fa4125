/**
 * The monitoring section of the model-summary PDF (issue 15): the model's later cases observed against expected,
 * overall, by unit (funnel plot), over time (risk-adjusted CUSUMs and cumulative O − E) and by period (drift),
 * with every limit and parameter used, the unscored rows and the monitoring cautions. All from one
 * MonitoringRecord (the one the page draws and `npm run fit -- --monitor … --json` prints).
 */
import {
  overallSignals,
  unitSignals,
  type MonitoringRecord,
  type RecalibrationOnPeriods,
  type UnscoredReason,
} from '../engine/monitoring';
import { MONITORING_CAUTIONS, type CautionSetting } from './cautions';
import { arlText, funnelFlagText, UNSCORED_REASON_TEXT } from './monitoringText';
import { DASH, formatCount, formatFixed, formatInterval, formatPlain, levelText } from './format';
import type { PdfLayout } from './pdfLayout';
import { drawCusum, drawDrift, drawFunnel, drawVlad } from './pdfMonitoringPlots';

/** What the PDF is given for monitoring: the record and, when the user asked for it, the recalibration. */
export interface MonitoringReport {
  record: MonitoringRecord;
  recalibration: RecalibrationOnPeriods | null;
}

const est = (e: { estimate: number | null; lower: number | null; upper: number | null } | null, d: number) =>
  e && e.estimate !== null
    ? formatFixed(e.estimate, d) +
      (e.lower !== null && e.upper !== null ? ` (${formatInterval(e.lower, e.upper, d)})` : '')
    : DASH;

/** The section; `alone`: printed on its own (no model summary above it to refer to). */
export function monitoringSection(
  L: PdfLayout,
  m: MonitoringReport | undefined,
  setting: CautionSetting,
  alone = false,
): void {
  if (!m) return;
  const r = m.record;
  const o = r.options;
  const lvl = levelText(r.overall.level);
  const modelName =
    r.model.source === 'model-file'
      ? `the model file "${r.model.name}"`
      : alone
        ? 'the current fit'
        : 'the model summarised above';
  L.section('Monitoring with the model', 60);
  L.paragraph(
    `Model: ${modelName} ` +
      `(outcome "${r.model.outcome}" = ${r.model.event}). ${formatCount(r.nUsed)} of ${formatCount(r.nRows)} ` +
      `rows monitored, dated ${r.dateRange.firstLabel} to ${r.dateRange.lastLabel}` +
      (r.nUnscored > 0 ? `; ${formatCount(r.nUnscored)} could not be scored (listed below).` : '.'),
  );
  L.paragraph(
    `Date column "${o.dateColumn}"; unit column ${o.unitColumn ? `"${o.unitColumn}"` : 'none'}; periods by ` +
      `${o.period}; CUSUM odds ratios ${formatPlain(o.oddsRatio.deteriorate, 3)} (deterioration) and ` +
      `${formatPlain(o.oddsRatio.improve, 3)} (improvement); ` +
      `target in-control run length ${formatCount(o.targetArl0)} ` +
      `cases; funnel limits ${o.funnelLevels.map(levelText).join(' and ')} (exact Poisson, Spiegelhalter 2005)` +
      `${o.overdispersion ? ', with overdispersion adjustment' : ''}; intervals ${lvl}.`,
    { size: 8.5, color: [80, 80, 80] },
  );

  L.subheading('Overall');
  const ov = r.overall;
  L.keyValues(
    [
      ['Observed events (O)', formatCount(ov.observed)],
      ['Expected events (E)', formatFixed(ov.expected, 1)],
      [`O/E (${lvl} exact CI)`, est(ov.oe, 2)],
      ['O \u2212 E', formatFixed(ov.oMinusE, 1)],
      [`Calibration-in-the-large (${lvl} CI)`, est(ov.calibrationInTheLarge, 3)],
      [`Calibration slope (${lvl} CI)`, est(ov.calibrationSlope, 3)],
    ],
    62,
  );

  if (r.funnel) {
    const f = r.funnel;
    const adj = f.overdispersion;
    L.ensure(7 + 84); // the sub-heading stays with its plot
    L.subheading('By unit: funnel plot');
    drawFunnel(L.doc, { left: L.left + 12, top: L.y + 8, w: 150, h: 64 }, f, !!adj?.applied);
    L.y += 84;
    if (adj)
      L.paragraph(
        adj.applied
          ? `Overdispersion: \u03c6 = ${formatFixed(adj.phi, 2)} from ${adj.units} units (z-scores winsorised at ` +
              `${adj.winsorised.map((p) => `${formatPlain(100 * p, 3)}%`).join(' and ')}); the limits drawn and the ` +
              'positions below are the adjusted ones.'
          : `Overdispersion: \u03c6 = ${formatFixed(adj.phi, 2)} \u2264 1, so the exact limits are kept.`,
        { size: 9 },
      );
    const flagOf = (u: (typeof f.units)[number]) => (adj?.applied && u.adjustedFlag ? u.adjustedFlag : u.flag);
    const outside = f.units.filter((u) => flagOf(u) !== 'within');
    if (outside.length === 0) L.paragraph('No unit lies outside the inner limits.');
    else
      L.table(
        [
          { header: 'Unit', width: 38 },
          { header: 'Cases', width: 16, align: 'right' },
          { header: 'O', width: 14, align: 'right' },
          { header: 'E', width: 16, align: 'right' },
          { header: `O/E (${lvl} CI)`, width: 40, align: 'right' },
          { header: 'Position', width: 50 },
        ],
        outside.map((u) => [
          u.unit,
          formatCount(u.n),
          formatCount(u.observed),
          formatFixed(u.expected, 1),
          est(u.oe, 2),
          funnelFlagText(flagOf(u)),
        ]),
      );
  }

  L.ensure(7 + 62);
  L.subheading('Over time: risk-adjusted CUSUM and cumulative O \u2212 E');
  const range: [number, number] = [r.dateRange.first, r.dateRange.last];
  drawCusum(L.doc, { left: L.left + 12, top: L.y + 8, w: 72, h: 44 }, r.cusum.deteriorate, range);
  drawCusum(L.doc, { left: L.left + 102, top: L.y + 8, w: 72, h: 44 }, r.cusum.improve, range);
  L.y += 62;
  for (const c of [r.cusum.deteriorate, r.cusum.improve])
    L.bullet(`${c.direction === 'deteriorate' ? 'Deterioration' : 'Improvement'}: ${arlText(c)}.`, 8.5);
  const signals = overallSignals(r);
  if (signals.length === 0) L.paragraph('Neither chart over all cases signalled.');
  else {
    L.table(
      [
        { header: 'Chart', width: 30 },
        { header: 'Date', width: 26 },
        { header: 'Case', width: 20, align: 'right' },
        { header: 'Unit of that case', width: 40 },
        { header: 'Spreadsheet row', width: 30, align: 'right' },
      ],
      signals
        .slice(0, 40)
        .map(({ s, chart }) => [chart, s.dateLabel, formatCount(s.case), s.unit ?? DASH, formatCount(s.row)]),
    );
    if (signals.length > 40) L.paragraph(`\u2026 and ${signals.length - 40} more signals (the page's CSV lists all).`);
  }
  if (r.cusum.deteriorate.byUnit) {
    const byUnit = unitSignals(r);
    if (byUnit.length === 0)
      L.paragraph('No unit\u2019s own chart signalled (each unit\u2019s cases run with the same h).');
    else {
      L.paragraph(
        'Signals on each unit\u2019s own chart (its cases in date order, same h; a unit with a small share of the ' +
          'cases can signal here when the chart over all cases does not):',
      );
      L.table(
        [
          { header: 'Unit', width: 36 },
          { header: 'Chart', width: 30 },
          { header: 'Date', width: 26 },
          { header: 'Case within the unit', width: 34, align: 'right' },
          { header: 'Spreadsheet row', width: 30, align: 'right' },
        ],
        byUnit
          .slice(0, 40)
          .map(({ s, chart, unit }) => [unit ?? DASH, chart, s.dateLabel, formatCount(s.case), formatCount(s.row)]),
      );
      if (byUnit.length > 40) L.paragraph(`\u2026 and ${byUnit.length - 40} more (the page's CSV lists all).`);
    }
  }
  L.ensure(60);
  drawVlad(L.doc, { left: L.left + 12, top: L.y + 5, w: 72, h: 42 }, r.vlad, range);
  if (r.periods.length > 0) drawDrift(L.doc, { left: L.left + 102, top: L.y + 5, w: 72, h: 42 }, r.periods);
  L.y += 60;

  if (r.periods.length > 0) {
    L.subheading(`Calibration drift by ${o.period}`);
    L.table(
      [
        { header: 'Period', width: 24 },
        { header: 'Cases', width: 18, align: 'right' },
        { header: 'O', width: 14, align: 'right' },
        { header: 'E', width: 18, align: 'right' },
        { header: `O/E (${lvl} CI)`, width: 44, align: 'right' },
        { header: `Calibration-in-the-large (${lvl} CI)`, width: 56, align: 'right' },
      ],
      r.periods.map((p) => [
        p.label,
        formatCount(p.n),
        formatCount(p.observed),
        formatFixed(p.expected, 1),
        est(p.oe, 2),
        est(p.citl, 2),
      ]),
      8,
    );
  }
  const rc = m.recalibration;
  if (rc)
    L.paragraph(
      `Recalibrated on the latest ${rc.periods.length === 1 ? 'period' : `${rc.periods.length} periods`} ` +
        `(${rc.periods.join(', ')}; ${formatCount(rc.nUsed)} cases, ${formatCount(rc.events)} events): new intercept ` +
        `${est(rc.intercept, 3)}, slope ${est(rc.slope, 3)} on the linear predictor.`,
      { bold: true },
    );

  if (r.nUnscored > 0) {
    L.subheading('Rows not scored');
    const reasons = (Object.keys(r.unscoredByReason) as UnscoredReason[]).filter((k) => r.unscoredByReason[k] > 0);
    L.paragraph(
      reasons.map((k) => `${formatCount(r.unscoredByReason[k])}: ${UNSCORED_REASON_TEXT[k]}`).join('; ') + '.',
    );
    L.paragraph(
      'First rows: ' +
        r.unscored
          .slice(0, 12)
          .map((u) => `row ${u.row} (${u.column}${u.value !== null ? ` = "${u.value}"` : ''})`)
          .join(', ') +
        (r.nUnscored > 12 ? ', \u2026' : '.'),
      { size: 8.5 },
    );
  }
  for (const w of r.warnings) L.bullet(`${w.message} ${w.suggestion}`, 9);
  L.subheading('Cautions on monitoring');
  for (const c of MONITORING_CAUTIONS[setting]) L.bullet(c, 9);
}
