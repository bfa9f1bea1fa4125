import type { Dataset } from '../core/data';
import type { FitMethod, FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { rowDiagnostics, rowInfluence, type RowDiagnostics } from './influence';

/** How far a measure applies to the fit's method, and why. */
export interface MeasureApplicability {
  measure: 'residuals' | 'leverage' | 'standardised residuals' | "Cook's distance" | 'DFBETAS';
  status: 'exact' | 'approximate' | 'not computed';
  why: string;
}

/** A reference line of the view and the PDF, with the rule it comes from. */
export interface ReferenceLine {
  measure: 'leverage' | 'cooks' | 'dfbetas' | 'residual' | 'shift';
  value: number;
  rule: string;
}

/** One of the most influential rows, named by its spreadsheet row number. */
export interface InfluentialRow {
  sheetRow: number;
  /** 0-based dataset index (what the data grid scrolls to). */
  dataRow: number;
  outcome: number;
  risk: number;
  leverage: number | null;
  stdPearson: number | null;
  stdDeviance: number | null;
  cooks: number | null;
  maxAbsDfbetas: number | null;
  dfbetasCoefficient: string | null;
  /** The non-intercept coefficient this row moves most (one-step, in its standard errors), with the odds ratios. */
  shift: { coefficient: string; inSe: number; oddsRatioBefore: number; oddsRatioAfter: number } | null;
}

/** The diagnostics as the analysis record keeps them: no per-row arrays (those come from rowDiagnostics). */
export interface DiagnosticsSummary {
  method: FitMethod;
  rowsChecked: number;
  rank: number;
  applicability: MeasureApplicability[];
  thresholds: ReferenceLine[];
  /** Top rows, by Cook's distance (or by |deviance residual| where Cook's distance does not apply). */
  rankedBy: 'cooks' | 'deviance residual';
  top: InfluentialRow[];
  counts: { leverageAbove2p: number; leverageAbove3p: number; cooksAbove4n: number; largeResidual: number } | null;
  /** Warnings that name rows (large residual, odds-ratio shift, Cook's distance above 1). */
  warnings: EngineWarning[];
}

export const TOP_ROWS = 10;
/** A row is named when leaving it out would move a coefficient by more than this many of its standard errors. */
export const SHIFT_SE = 0.5;
/** A standardised deviance residual beyond ±3 is "very large" (common practice). */
export const LARGE_RESIDUAL = 3;
const LISTED = 8;

/** Which measures apply to `method`, and why. */
export function measureApplicability(method: FitMethod, hasCovariance: boolean): MeasureApplicability[] {
  const raw: MeasureApplicability = {
    measure: 'residuals',
    status: 'exact',
    why: 'Pearson and deviance residuals need only the fitted risks.',
  };
  const hatBased = ['leverage', 'standardised residuals', "Cook's distance", 'DFBETAS'] as const;
  if (method === 'ridge' || method === 'lasso' || method === 'elastic-net') {
    const why =
      'The estimates are shrunk on purpose: leverage, Cook’s distance and DFBETAS from the unpenalised information ' +
      'would ignore the penalty (and, for lasso and elastic net, which coefficients were selected), so they would ' +
      'misstate how a row moves this fit. Use “leave rows out” to refit and compare.';
    return [raw, ...hatBased.map((measure) => ({ measure, status: 'not computed' as const, why }))];
  }
  if (!hasCovariance) {
    const why =
      'The fit has no covariance matrix (separation: some risks are 0 or 1, so X′WX is singular); these measures ' +
      'divide by it.';
    return [raw, ...hatBased.map((measure) => ({ measure, status: 'not computed' as const, why }))];
  }
  if (method === 'firth') {
    return [
      raw,
      {
        measure: 'leverage',
        status: 'exact',
        why: 'The hat values at the Firth estimate, wᵢ·xᵢ′(X′WX)⁻¹xᵢ: the same ones Firth’s adjustment uses.',
      },
      {
        measure: 'standardised residuals',
        status: 'exact',
        why: 'Residuals divided by √(1 − hᵢ) with those hat values.',
      },
      {
        measure: "Cook's distance",
        status: 'approximate',
        why:
          'One-step formula of maximum likelihood: it does not follow the change of the Firth penalty when a row ' +
          'is left out. Refit without the row for the exact change.',
      },
      {
        measure: 'DFBETAS',
        status: 'approximate',
        why: 'As Cook’s distance: a one-step approximation that ignores the change of the Firth penalty.',
      },
    ];
  }
  const why = 'As R computes it for a binomial glm (one-step formulas; no refit per row).';
  return [raw, ...hatBased.map((measure) => ({ measure, status: 'exact' as const, why }))];
}

/** The reference lines for n rows and rank p, each with its rule. */
export function referenceLines(n: number, p: number): ReferenceLine[] {
  return [
    { measure: 'leverage', value: (2 * p) / n, rule: 'leverage 2p/n: twice the mean leverage (common practice)' },
    { measure: 'leverage', value: (3 * p) / n, rule: 'leverage 3p/n: three times the mean leverage (common practice)' },
    { measure: 'cooks', value: 4 / n, rule: "Cook's distance 4/n (common practice)" },
    { measure: 'cooks', value: 1, rule: "Cook's distance 1 (common practice)" },
    { measure: 'dfbetas', value: 2 / Math.sqrt(n), rule: '|DFBETAS| 2/√n (common practice)' },
    { measure: 'residual', value: LARGE_RESIDUAL, rule: '|standardised residual| 3 (common practice)' },
    {
      measure: 'shift',
      value: SHIFT_SE,
      rule: 'leaving the row out moves a coefficient by more than half its standard error (Fulcra’s stated amount)',
    },
  ];
}

/** Indices of the k largest values of `score` (NaN last), largest first: one pass, O(n·k). */
export function topIndices(score: ArrayLike<number>, k: number): number[] {
  const top: number[] = [];
  for (let i = 0; i < score.length; i++) {
    const s = score[i];
    if (!(s === s)) continue;
    if (top.length === k && s <= score[top[k - 1]]) continue;
    let at = top.length;
    while (at > 0 && score[top[at - 1]] < s) at--;
    top.splice(at, 0, i);
    if (top.length > k) top.pop();
  }
  return top;
}

/** |x| of each value, in a plain loop (Float64Array.from with a map callback took 0.1 s at 10⁶ rows). */
function absolute(x: Float64Array): Float64Array {
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Math.abs(x[i]);
  return out;
}

/** Indices whose score exceeds `limit`, largest first (few rows pass, so the sort is cheap). */
function above(score: ArrayLike<number>, limit: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < score.length; i++) if (score[i] > limit) out.push(i);
  return out.sort((a, b) => score[b] - score[a]);
}

const rowList = (rows: number[]): string =>
  rows.length === 1 ? `spreadsheet row ${rows[0]}` : `spreadsheet rows ${rows.join(', ')}`;

/** An odds ratio with enough digits to show a change (per-minute odds ratios sit close to 1). */
export const fmtOddsRatio = (x: number): string =>
  Math.abs(x - 1) < 0.05 ? x.toFixed(4) : x >= 100 ? x.toFixed(1) : x.toPrecision(3);

/**
 * The summary of `d` for the analysis record: the top rows with their spreadsheet row numbers, the reference lines
 * and their rules, the applicability of each measure, and warnings that name rows.
 */
export function summariseDiagnostics(f: FitResult, data: Dataset, d: RowDiagnostics): DiagnosticsSummary {
  const n = d.y.length;
  const p = d.rank;
  const names = f.coefficients.map((c) => c.name);
  const applicability = measureApplicability(f.method, d.leverage !== null);
  const thresholds = referenceLines(n, p);
  const absDev = absolute(d.deviance);
  const rankedBy = d.cooks ? 'cooks' : 'deviance residual';
  const order = topIndices(d.cooks ?? absDev, TOP_ROWS);
  const shiftOf = (i: number): InfluentialRow['shift'] => {
    const inf = rowInfluence(f, data, d.dataRows[i]);
    if (!inf || d.maxShiftColumn === null) return null;
    const j = d.maxShiftColumn[i];
    if (j < 1) return null;
    const b = f.coefficients[j].estimate;
    return {
      coefficient: names[j],
      inSe: d.maxShiftInSe![i],
      oddsRatioBefore: Math.exp(b),
      oddsRatioAfter: Math.exp(b - inf.delta[j]),
    };
  };
  const top: InfluentialRow[] = order.map((i) => ({
    sheetRow: d.sheetRows[i],
    dataRow: d.dataRows[i],
    outcome: d.y[i],
    risk: d.risk[i],
    leverage: d.leverage?.[i] ?? null,
    stdPearson: d.stdPearson?.[i] ?? null,
    stdDeviance: d.stdDeviance?.[i] ?? null,
    cooks: d.cooks?.[i] ?? null,
    maxAbsDfbetas: d.maxAbsDfbetas?.[i] ?? null,
    dfbetasCoefficient: d.maxDfbetasColumn && d.maxDfbetasColumn[i] > 0 ? names[d.maxDfbetasColumn[i]] : null,
    shift: shiftOf(i),
  }));
  const warnings: EngineWarning[] = [];
  let counts: DiagnosticsSummary['counts'] = null;
  if (d.leverage && d.cooks && d.stdDeviance) {
    const [lev2, lev3, cook4] = [thresholds[0].value, thresholds[1].value, thresholds[2].value];
    counts = { leverageAbove2p: 0, leverageAbove3p: 0, cooksAbove4n: 0, largeResidual: 0 };
    for (let i = 0; i < n; i++) {
      if (d.leverage[i] > lev2) counts.leverageAbove2p++;
      if (d.leverage[i] > lev3) counts.leverageAbove3p++;
      if (d.cooks[i] > cook4) counts.cooksAbove4n++;
      if (Math.abs(d.stdDeviance[i]) > LARGE_RESIDUAL) counts.largeResidual++;
    }
  }
  const resid = d.stdDeviance ?? d.deviance;
  const large = above(absolute(resid), LARGE_RESIDUAL);
  if (large.length > 0) {
    const shown = large.slice(0, LISTED).map((i) => d.sheetRows[i]);
    const more = large.length > LISTED ? ` and ${large.length - LISTED} more` : '';
    warnings.push(
      warning(
        'diagnostic-large-residual',
        `${large.length === 1 ? 'One row has' : `${large.length} rows have`} a ` +
          `${d.stdDeviance ? 'standardised ' : ''}` +
          `deviance residual beyond ±${LARGE_RESIDUAL} (common practice): ${rowList(shown)}${more}. ` +
          `${large.length === 1 ? 'Its outcome is' : 'Their outcomes are'} very unlikely under the model.`,
        'Check these rows in the data grid for data-entry errors (outcome coded the wrong way, impossible values).',
      ),
    );
  }
  if (d.maxShiftInSe && d.maxShiftColumn) {
    const moving = above(d.maxShiftInSe, SHIFT_SE);
    if (moving.length > 0) {
      const parts = moving.slice(0, 5).map((i) => {
        const s = shiftOf(i)!;
        return (
          `row ${d.sheetRows[i]} would move the odds ratio of ${s.coefficient} ` +
          `from ${fmtOddsRatio(s.oddsRatioBefore)} to ` +
          `${fmtOddsRatio(s.oddsRatioAfter)} (${s.inSe.toFixed(1)} standard errors)`
        );
      });
      const more = moving.length > 5 ? `; and ${moving.length - 5} more rows` : '';
      warnings.push(
        warning(
          'diagnostic-odds-ratio-shift',
          `Leaving out single rows would move an odds ratio by more than half its standard error ` +
            `(one-step estimate, Pregibon 1981): ${parts.join('; ')}${more}.`,
          'Check these rows; use “leave rows out” to refit without them and compare the odds ratios.',
          [...new Set(moving.slice(0, 5).map((i) => names[d.maxShiftColumn![i]]))],
        ),
      );
    }
  }
  if (d.cooks) {
    const big = above(d.cooks, 1);
    if (big.length > 0) {
      warnings.push(
        warning(
          'diagnostic-cooks-distance',
          'Cook’s distance is above 1 (common practice) for ' +
            `${rowList(big.slice(0, LISTED).map((i) => d.sheetRows[i]))}` +
            `${big.length > LISTED ? ` and ${big.length - LISTED} more` : ''}: each of these rows alone moves the ` +
            'whole set of coefficients a long way.',
          'Check these rows; use “leave rows out” to refit without them and compare.',
        ),
      );
    }
  }
  return { method: f.method, rowsChecked: n, rank: p, applicability, thresholds, rankedBy, top, counts, warnings };
}

/** rowDiagnostics and its summary in one call. */
export function diagnose(f: FitResult, data: Dataset): { rows: RowDiagnostics; summary: DiagnosticsSummary } {
  const rows = rowDiagnostics(f, data);
  return { rows, summary: summariseDiagnostics(f, data, rows) };
}
