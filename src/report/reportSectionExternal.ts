import type { EngineWarning } from '../engine/core';
import { SAME_CASES_CODE, SHARED_CASES_CODE } from '../engine/validation';
import { DASH, formatCount, formatFixed, formatInterval, levelText } from './format';
import type { PdfLayout } from './pdfLayout';
import type { Estimate } from './reportInput';

/** The model checked on one file with known outcomes that was not used to fit it (TRIPOD: validation). */
export interface ExternalSummary {
  /** The file's rows, the cases scored (complete) and the confidence level of the intervals. */
  nRows: number;
  n: number;
  level: number;
  auc: Estimate | null;
  calibrationIntercept: Estimate | null;
  calibrationSlope: Estimate | null;
  brier: number | null;
  /** Logistic recalibration for that setting: logit P = a + b·LP (b null when not estimable). */
  recalibrated: { intercept: Estimate; slope: Estimate | null } | null;
  /** The file holds exactly the development cases (a warning coded SAME_CASES_CODE says so in the record). */
  sameCases: boolean;
  warnings: EngineWarning[];
}

/** Codes of the warnings that an "external" file holds exactly the development cases, or some of them. */

/** The one-line caution printed under every external validation. */
export const EXTERNAL_CAUTION =
  'One external sample is one setting: performance elsewhere (another time, place or population) can differ, ' +
  'and the recalibrated model is fitted to this sample.';

function est(e: Estimate | null | undefined, digits: number): string {
  if (!e) return DASH;
  const ci = e.lower === null || e.upper === null ? '' : ` (${formatInterval(e.lower, e.upper, digits)})`;
  return formatFixed(e.estimate, digits) + ci;
}

/** The external-validation section: n, AUC, calibration, Brier, the recalibrated model and the caution. */
export function externalSection(L: PdfLayout, x: ExternalSummary | undefined): void {
  if (!x) return;
  L.section('External validation');
  const shared = x.warnings.find((w) => w.code === SHARED_CASES_CODE);
  if (x.sameCases) {
    L.paragraph(
      'This file holds the same cases the model was fitted on: this is not an external validation. The values ' +
        'below repeat the fit (calibration intercept 0 and slope 1 by construction).',
      { bold: true, color: [160, 60, 0] },
    );
  } else if (shared) {
    L.paragraph(shared.message, { bold: true, color: [160, 60, 0] });
  }
  const lvl = levelText(x.level);
  const dropped = x.nRows - x.n;
  const rows: [string, string][] = [
    ['Cases', `${formatCount(x.n)} scored${dropped > 0 ? ` (${formatCount(dropped)} left out: missing values)` : ''}`],
    [`AUC (${lvl} CI)`, est(x.auc, 3)],
    [`Calibration intercept (${lvl} CI)`, est(x.calibrationIntercept, 3)],
    [`Calibration slope (${lvl} CI)`, est(x.calibrationSlope, 3)],
    ['Brier score', formatFixed(x.brier, 4)],
    [
      'Recalibrated for this setting',
      x.recalibrated
        ? `intercept ${est(x.recalibrated.intercept, 3)}` +
          (x.recalibrated.slope ? `, slope ${est(x.recalibrated.slope, 3)} on the linear predictor` : '')
        : DASH,
    ],
  ];
  L.keyValues(rows, 58);
  const own = new Set([SAME_CASES_CODE, SHARED_CASES_CODE]);
  for (const w of x.warnings) if (!own.has(w.code)) L.bullet(`${w.message} ${w.suggestion}`, 9);
  L.paragraph(EXTERNAL_CAUTION, { size: 9, color: [80, 80, 80] });
}
