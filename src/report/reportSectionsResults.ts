import type { EngineWarning } from '../engine/core';
import { DASH, formatCount, formatFixed, formatInterval, formatPercent, formatSig, levelText } from './format';
import { costsText } from './cutoffRule';
import { CAUTIONS_BY_SETTING, cautionSettingOf, type CautionSetting } from './cautions';
import type { PdfLayout } from './pdfLayout';
import { drawCalibration, drawDecisionCurve, drawRoc } from './pdfPlots';
import type { Estimate, PerformanceSummary, ReportInput, ThresholdSummary } from './reportInput';

// Report sections about performance and use (TRIPOD items: model performance, decision threshold, warnings,
// limitations).

/** The cautions printed in a clinical report (the default setting); see CAUTIONS_BY_SETTING. */
export const REPORT_CAUTIONS: readonly string[] = CAUTIONS_BY_SETTING.clinical;

function est(e: Estimate | null | undefined, digits: number): string {
  if (!e) return DASH;
  const ci = e.lower === null || e.upper === null ? '' : ` (${formatInterval(e.lower, e.upper, digits)})`;
  return formatFixed(e.estimate, digits) + ci;
}

export function performance(L: PdfLayout, input: ReportInput): void {
  L.section('Performance');
  const a = input.apparent;
  const c = input.corrected;
  if (!a && !c) {
    L.paragraph('Performance was not evaluated for this report.');
    return;
  }
  const lvl = levelText(input.model.level);
  const o = c?.optimism;
  const row = (label: string, pick: (p: PerformanceSummary) => Estimate | null | undefined, d: number): string[] => [
    label,
    a ? est(pick(a), d) : DASH,
    ...(o ? [est(pick(o), d)] : []),
    c ? est(pick(c), d) : DASH,
  ];
  const rows = [
    row('AUC (c-statistic)', (p) => p.auc, 3),
    row('Calibration slope', (p) => p.calibrationSlope, 3),
    row('Calibration intercept (in the large)', (p) => p.calibrationIntercept, 3),
    row('Brier score', (p) => p.brier, 4),
  ];
  if (a?.scaledBrier || c?.scaledBrier) rows.push(row('Scaled Brier score', (p) => p.scaledBrier, 3));
  L.table(
    o
      ? [
          { header: 'Measure', width: 46 },
          { header: `Apparent (${lvl} CI)`, width: 46, align: 'right' },
          { header: 'Optimism (2.5–97.5% of replicates)', width: 46, align: 'right' },
          { header: 'Optimism-corrected', width: 36, align: 'right' },
        ]
      : [
          { header: 'Measure', width: 58 },
          { header: `Apparent (${lvl} CI)`, width: 58, align: 'right' },
          { header: 'Optimism-corrected', width: 58, align: 'right' },
        ],
    rows,
  );
  const how = c
    ? 'Optimism-corrected value = apparent − mean optimism; ' +
      (c.method ?? 'bootstrap optimism correction (Harrell, Lee & Mark 1996, Stat Med 15:361)') +
      `${c.replicates ? `, ${formatCount(c.replicates)} replicates` : ''}.`
    : 'No internal validation was run; apparent performance is optimistic.';
  const ce = input.calibrationErrors;
  if (ce) {
    L.paragraph(
      `Calibration error of the flexible curve (apparent): ICI ${formatFixed(ce.ici, 3)}, ` +
        `E50 ${formatFixed(ce.e50, 3)}, E90 ${formatFixed(ce.e90, 3)}, Emax ${formatFixed(ce.emax, 3)} ` +
        '(absolute differences between predicted and calibrated risk; Austin & Steyerberg 2019, Stat Med 38:4051).',
      { size: 8.5 },
    );
  }
  L.paragraph(
    `Apparent values are measured on the same data used to fit the model. ${how} AUC interval: DeLong (1988). ` +
      'Calibration slope and intercept: Wald intervals; slope 1 and intercept 0 are ideal.',
    { size: 8.5 },
  );
}

export function plots(L: PdfLayout, input: ReportInput): void {
  if (!input.roc && !input.calibration && !input.decisionCurve) return;
  const size = 70;
  L.section('Calibration, discrimination and net benefit', input.calibration || input.roc ? size + 18 : 70);
  if (input.calibration || input.roc) {
    L.ensure(size + 18);
    const top = L.y + 6;
    if (input.calibration) drawCalibration(L.doc, L.left + 12, top, size, input.calibration);
    if (input.roc) drawRoc(L.doc, L.left + 104, top, size, input.roc);
    L.y = top + size + 12;
  }
  if (input.decisionCurve) {
    L.ensure(70);
    const top = L.y + 6;
    drawDecisionCurve(L.doc, L.left + 12, top, 150, 55, input.decisionCurve);
    L.y = top + 55 + 12;
  }
  L.paragraph(
    'Calibration: observed risk from a flexible (restricted cubic spline) logistic recalibration on the linear ' +
      'predictor, with its pointwise confidence band; points on the dashed diagonal are perfectly calibrated. ' +
      'Decision curve: net benefit = TP/n \u2212 FP/n \u00d7 t/(1 \u2212 t) ' +
      '(Vickers & Elkin 2006, Med Decis Making 26:565).',
    { size: 8.5 },
  );
}

export function threshold(L: PdfLayout, input: ReportInput): void {
  const t = input.threshold;
  if (!t) return;
  L.section('Decision threshold');
  const val = (x: Estimate | number): Estimate =>
    typeof x === 'number' ? { estimate: x, lower: null, upper: null } : x;
  const pct = (x: Estimate | number): string => {
    const e = val(x);
    return (
      formatPercent(e.estimate) +
      (e.lower !== null && e.upper !== null ? ` (${formatPercent(e.lower)} to ${formatPercent(e.upper)})` : '')
    );
  };
  L.keyValues(
    [
      [
        'Threshold',
        `flag a case when predicted risk \u2265 ${formatPercent(t.threshold, 1)} (${formatFixed(t.threshold, 4)})`,
      ],
      ['Costs', costsText({ missedCase: t.costMissedCase, falseAlarm: t.costFalseAlarm }, t.costsSetByUser !== false)],
      ['How chosen', t.rule ?? 'set by the user'],
      ['Flag rule', 'a case is flagged when its predicted risk is greater than or equal to the threshold'],
    ],
    30,
  );
  const n = t.tp + t.fp + t.fn + t.tn;
  L.table(
    [
      { header: '', width: 50 },
      { header: 'Event', width: 30, align: 'right' },
      { header: 'No event', width: 30, align: 'right' },
      { header: 'Total', width: 30, align: 'right' },
    ],
    [
      [`Flagged (risk \u2265 threshold)`, formatCount(t.tp), formatCount(t.fp), formatCount(t.tp + t.fp)],
      ['Not flagged', formatCount(t.fn), formatCount(t.tn), formatCount(t.fn + t.tn)],
      ['Total', formatCount(t.tp + t.fn), formatCount(t.fp + t.tn), formatCount(n)],
    ],
  );
  const rows: [string, string][] = [
    ['Sensitivity', pct(t.sensitivity)],
    ['Specificity', pct(t.specificity)],
    ['Positive predictive value', pct(t.ppv)],
    ['Negative predictive value', pct(t.npv)],
  ];
  const lr = (label: string, v: ThresholdSummary['lrPositive'], digits: number) => {
    if (v?.estimate === null || v?.estimate === undefined) return;
    rows.push([
      label,
      formatSig(v.estimate, digits) +
        (v.ci ? ` (95% CI ${formatSig(v.ci.lower, digits)} to ${formatSig(v.ci.upper, digits)}, log method)` : ''),
    ]);
  };
  lr('Positive likelihood ratio', t.lrPositive, 3);
  lr('Negative likelihood ratio', t.lrNegative, 3);
  if (t.fractionFlagged !== undefined) rows.push(['Cases flagged', formatPercent(t.fractionFlagged)]);
  if (t.expectedCostPer100 !== undefined)
    rows.push(['Expected cost per 100 cases', formatSig(t.expectedCostPer100, 4)]);
  L.keyValues(rows, 50);
}

/**
 * The warnings, message and suggestion only (internal codes stay out of the PDF). The last item is kept on one
 * page with the `keepWithNext` mm that follow (the cautions), so the cautions never stand alone on a page.
 */
export function warningsSection(L: PdfLayout, warnings: EngineWarning[], keepWithNext = 0): void {
  L.section('Warnings');
  const seen = new Set<string>();
  const unique = warnings.filter((w) => {
    const key = `${w.code}\u0000${w.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
  if (unique.length === 0) {
    L.ensure(L.lineHeight(9.5) + keepWithNext);
    L.paragraph('No warnings were raised by the fit or the checks.');
    return;
  }
  unique.forEach((w, i) => {
    const text = `${w.message} ${w.suggestion}`;
    if (i === unique.length - 1) L.ensure(L.bulletsHeight([text], 9) + keepWithNext);
    L.bullet(text, 9);
  });
}

/** The height in mm the cautions section takes (heading and bullets), for keeping it with what comes before. */
export function cautionsHeight(L: PdfLayout, setting: CautionSetting = 'clinical'): number {
  return Math.min(
    L.bottom - L.top - 20,
    L.headingHeight + Math.max(24, L.bulletsHeight(CAUTIONS_BY_SETTING[cautionSettingOf(setting)], 9)),
  );
}

export function cautions(L: PdfLayout, setting: CautionSetting = 'clinical'): void {
  L.ensure(Math.min(55, cautionsHeight(L, setting)));
  L.section('Cautions');
  for (const c of CAUTIONS_BY_SETTING[cautionSettingOf(setting)]) L.bullet(c, 9);
}
