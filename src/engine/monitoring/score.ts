import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import { linearPredictorFromRecipe } from '../design/design';
import { sigmoid } from '../numerics/loss';
import type { ScoringModel } from '../validation/recalibration';
import type { MonitoringCases, MonitoringScoringSummary } from './monitor';
import type { UnscoredReason, UnscoredRow } from './types';

/** A unit per data row: codes into `levels`, −1 where missing. */
export interface UnitCodes {
  codes: Int32Array;
  levels: string[];
}

/** Most unscored rows listed one by one (all are counted). */
export const UNSCORED_LISTED = 1000;

/** The unit of every row of `data` from column `name` (numbers become their text). */
export function unitsFromColumn(data: Dataset, name: string): UnitCodes {
  const col = getColumn(data, name);
  if (col.kind === 'categorical') return { codes: col.codes, levels: col.levels };
  const levels: string[] = [];
  const index = new Map<number, number>();
  const codes = new Int32Array(data.nRows);
  for (let i = 0; i < data.nRows; i++) {
    const v = col.values[i];
    if (Number.isNaN(v)) {
      codes[i] = -1;
      continue;
    }
    let c = index.get(v);
    if (c === undefined) {
      c = levels.length;
      index.set(v, c);
      levels.push(String(v));
    }
    codes[i] = c;
  }
  return { codes, levels };
}

/** Sets `why[r] = code` (and the column index) on each still-scored row where `col` is missing. */
function markMissing(col: Column, why: Uint8Array, code: number, whyColumn: Int32Array, j: number): void {
  const n = why.length;
  if (col.kind === 'numeric') {
    const v = col.values;
    for (let r = 0; r < n; r++)
      if (v[r] !== v[r] && why[r] === 0) {
        why[r] = code;
        whyColumn[r] = j;
      }
  } else {
    const c = col.codes;
    for (let r = 0; r < n; r++)
      if (c[r] < 0 && why[r] === 0) {
        why[r] = code;
        whyColumn[r] = j;
      }
  }
}

function textOf(col: Column, r: number): string | null {
  if (col.kind === 'categorical') return col.codes[r] < 0 ? null : col.levels[col.codes[r]];
  return Number.isNaN(col.values[r]) ? null : String(col.values[r]);
}

/**
 * Scores the rows of a monitoring file with `model` (its recipe and coefficients, unchanged) and sorts the scored
 * cases by date (ties keep file order). A row is not scored, and is listed with its spreadsheet row and reason,
 * when its date, outcome, unit (if units are given) or a predictor is missing, or a categorical predictor has a
 * category the model was not fitted with. `dates` are epoch days per data row (NaN: missing or unreadable);
 * `names` are the date and unit columns, for the list.
 */
export function scoreMonitoring(
  model: ScoringModel,
  data: Dataset,
  dates: Float64Array,
  units: UnitCodes | null,
  names: { date: string; unit: string | null } = { date: '(date)', unit: '(unit)' },
): { cases: MonitoringCases; summary: MonitoringScoringSummary } {
  const { recipe } = model;
  if (
    model.coefficients.length !== recipe.columnNames.length ||
    model.coefficients.some((c, j) => c.name !== recipe.columnNames[j])
  )
    throw new FulcraError('model-mismatch', 'The coefficients do not line up with the model recipe’s design columns.');
  if (dates.length !== data.nRows)
    throw new FulcraError('internal', `${dates.length} dates were given for ${data.nRows} rows.`);
  if (!data.columns.some((c) => c.name === recipe.outcome))
    throw new FulcraError(
      'no-outcome',
      `The monitoring file has no column "${recipe.outcome}", the model's outcome.`,
      'Add the outcome column: monitoring compares observed outcomes with the model’s risks.',
    );
  const outcome = getColumn(data, recipe.outcome);
  const used = new Set<string>();
  for (const t of recipe.terms) for (const c of t.type === 'interaction' ? t.parts : [t.column]) used.add(c);
  const predictors = [...used].map((name) => getColumn(data, name));
  const known = new Map<string, Set<string>>();
  for (const t of recipe.terms) if (t.type === 'categorical') known.set(t.column, new Set(t.levels));
  const categorical = predictors.filter((c) => known.has(c.name));

  const byReason: Record<UnscoredReason, number> = {
    'missing-date': 0,
    'missing-outcome': 0,
    'missing-unit': 0,
    'missing-value': 0,
    'unknown-category': 0,
  };
  const unscored: UnscoredRow[] = [];
  const keep = new Int32Array(data.nRows);
  let k = 0;
  const skip = (r: number, reason: UnscoredReason, column: string, value: string | null = null) => {
    byReason[reason]++;
    if (unscored.length < UNSCORED_LISTED) unscored.push({ row: sheetRow(data, r), reason, column, value });
  };
  // One tight pass per column, in the order the reasons are checked (date, outcome, unit, each predictor, each
  // category), so that every row keeps its first reason; then one pass lists the unscored rows and keeps the rest.
  const N = data.nRows;
  const why = new Uint8Array(N); // 0: scored; else 1 + index in REASONS
  const whyColumn = new Int32Array(N);
  for (let r = 0; r < N; r++) if (!Number.isFinite(dates[r])) why[r] = 1;
  markMissing(outcome, why, 2, whyColumn, 0);
  if (units) for (let r = 0; r < N; r++) if (why[r] === 0 && units.codes[r] < 0) why[r] = 3;
  predictors.forEach((c, j) => markMissing(c, why, 4, whyColumn, j));
  categorical.forEach((c, j) => {
    const ok = known.get(c.name)!;
    if (c.kind === 'categorical') {
      const knownCode = Uint8Array.from(c.levels, (l) => (ok.has(l) ? 1 : 0));
      for (let r = 0; r < N; r++)
        if (why[r] === 0 && knownCode[c.codes[r]] === 0) {
          why[r] = 5;
          whyColumn[r] = j;
        }
    } else
      for (let r = 0; r < N; r++)
        if (why[r] === 0 && !ok.has(textOf(c, r)!)) {
          why[r] = 5;
          whyColumn[r] = j;
        }
  });
  for (let r = 0; r < N; r++) {
    const w = why[r];
    if (w === 0) keep[k++] = r;
    else if (w === 1) skip(r, 'missing-date', names.date);
    else if (w === 2) skip(r, 'missing-outcome', outcome.name);
    else if (w === 3) skip(r, 'missing-unit', names.unit ?? '(unit)');
    else if (w === 4) skip(r, 'missing-value', predictors[whyColumn[r]].name);
    else {
      const c = categorical[whyColumn[r]];
      skip(r, 'unknown-category', c.name, textOf(c, r));
    }
  }
  const enc = linearPredictorFromRecipe(
    recipe,
    model.coefficients.map((c) => c.estimate),
    data,
    // every kept row has its outcome and predictors (checked above, with the reasons listed)
    { rows: keep.subarray(0, k), complete: true },
  );
  const n = enc.n;
  const src = enc.rowsUsed;
  const order = new Int32Array(n);
  let sorted = true;
  for (let i = 0; i < n; i++) {
    order[i] = i;
    if (i > 0 && dates[src[i]] < dates[src[i - 1]]) sorted = false;
  }
  if (!sorted) order.sort((a, b) => dates[src[a]] - dates[src[b]] || a - b);
  const y = new Float64Array(n),
    eta = new Float64Array(n),
    risk = new Float64Array(n),
    date = new Float64Array(n),
    row = new Int32Array(n);
  const unit = units ? new Int32Array(n) : null;
  const ey = enc.y!;
  // sheetRow(data, r), without a call per case
  const listed = data.rowNumbers ?? null;
  const first = data.firstRow ?? 2;
  // Typed loops with their arrays in locals; when the file is already in date order (and, for the row-indexed
  // arrays, every row was scored) the copies are bulk copies, which cost little even on a first, unoptimised call.
  const ee = enc.eta;
  if (sorted) {
    y.set(ey);
    eta.set(ee);
  } else
    for (let i = 0; i < n; i++) {
      const j = order[i];
      y[i] = ey[j];
      eta[i] = ee[j];
    }
  for (let i = 0; i < n; i++) risk[i] = sigmoid(eta[i]);
  const identity = sorted && n === data.nRows; // case i is data row i
  let srcRow: Int32Array;
  if (identity) srcRow = src;
  else {
    srcRow = new Int32Array(n);
    for (let i = 0; i < n; i++) srcRow[i] = src[order[i]];
  }
  if (identity) date.set(dates);
  else for (let i = 0; i < n; i++) date[i] = dates[srcRow[i]];
  if (listed) for (let i = 0; i < n; i++) row[i] = listed[srcRow[i]];
  else for (let i = 0; i < n; i++) row[i] = first + srcRow[i];
  if (unit && units) {
    const uc = units.codes;
    if (identity) unit.set(uc);
    else for (let i = 0; i < n; i++) unit[i] = uc[srcRow[i]];
  }
  return {
    cases: { y, eta, risk, date, unit, unitLevels: units ? units.levels : [], row },
    summary: { nRows: data.nRows, unscored, unscoredByReason: byReason },
  };
}
