import type { ForestData, SubgroupPerformance, SubgroupPrecision, SubgroupRow } from '../engine/subgroups';
import { DASH, formatCount, formatFixed, formatPercent, levelText } from './format';

/**
 * The subgroup table as text, the same cells on the page, in the PDF and in `npm run fit` (one record, one
 * wording): n, events, O/E, AUC, calibration-in-the-large and slope with their intervals, and at the cut-off
 * sensitivity, specificity and the fraction flagged. `sep` goes between an estimate and its interval (a line
 * break in the PDF's narrow columns, a space elsewhere).
 */
export function subgroupTableText(
  perf: SubgroupPerformance,
  sep = ' ',
  cutoffInHeader = true,
): { header: string[]; rows: string[][] } {
  const lvl = levelText(perf.level);
  const cut = perf.threshold === null ? null : formatFixed(perf.threshold, 3);
  const at = cutoffInHeader ? ` at ${cut}` : '';
  const header = [
    'Group',
    'n',
    'Events',
    `O/E (${lvl} exact)`,
    `AUC (${lvl} DeLong)`,
    `Calibration-in-the-large (${lvl})`,
    `Calibration slope (${lvl})`,
    ...(cut === null ? [] : [`Sensitivity${at}`, `Specificity${at}`, `Flagged${at}`]),
  ];
  const rows = [...perf.rows, perf.overall].map((r) => rowCells(r, sep, cut !== null));
  return { header, rows };
}

const interval = (
  e: { estimate: number | null; lower: number | null; upper: number | null } | null,
  digits: number,
  sep: string,
): string =>
  !e || e.estimate === null
    ? DASH
    : `${formatFixed(e.estimate, digits)}${sep}(${formatFixed(e.lower, digits)} to ${formatFixed(e.upper, digits)})`;

const pct = (e: { estimate: number | null } | undefined): string => formatPercent(e?.estimate ?? null, 0);

function rowCells(r: SubgroupRow, sep: string, atCutoff: boolean): string[] {
  const c = r.atCutoff;
  return [
    r.label === 'all rows' ? 'All rows' : r.label,
    formatCount(r.n),
    formatCount(r.events),
    interval(r.observedExpected, 2, sep),
    interval(r.auc, 3, sep),
    interval(r.calibrationInTheLarge, 2, sep),
    interval(r.calibrationSlope, 2, sep),
    ...(atCutoff ? [pct(c?.sensitivity), pct(c?.specificity), pct(c?.fractionFlagged)] : []),
  ];
}

/** What the too-small rule says of a group, in a few words for a table or a plot. */
export const PRECISION_WORDS: Record<SubgroupPrecision, string> = {
  adequate: '',
  imprecise: 'imprecise',
  'counts-only': 'too small: no AUC or calibration',
  'one-class': 'one outcome class only',
};

/**
 * The x range of a forest panel: every finite estimate and interval limit and the reference line, padded by 5%
 * (on the log scale for O/E, whose non-positive values are left out). AUC and the cut-off proportions stay
 * within [0, 1].
 */
export function forestDomain(fd: ForestData): [number, number] {
  const log = fd.scale === 'log';
  const vals = [fd.reference];
  for (const r of [...fd.rows, fd.overall])
    for (const v of [r.estimate, r.lower, r.upper])
      if (v !== null && Number.isFinite(v) && (!log || v > 0)) vals.push(v);
  const t = (v: number) => (log ? Math.log(v) : v);
  const u = (v: number) => (log ? Math.exp(v) : v);
  let lo = t(Math.min(...vals));
  let hi = t(Math.max(...vals));
  if (hi - lo < 1e-9) {
    lo -= log ? 0.5 : 0.1;
    hi += log ? 0.5 : 0.1;
  }
  const pad = 0.05 * (hi - lo);
  const domain: [number, number] = [u(lo - pad), u(hi + pad)];
  if (fd.measure !== 'observedExpected' && !fd.measure.startsWith('calibration'))
    return [Math.max(0, domain[0]), Math.min(1, domain[1])];
  return domain;
}

/** The measures drawn as forest panels by default (page and PDF): O/E, AUC and the calibration slope. */
export const FOREST_MEASURES = ['observedExpected', 'auc', 'calibrationSlope'] as const;
