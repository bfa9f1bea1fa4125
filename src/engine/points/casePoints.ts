import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import { parseDecimal } from '../design/levels';
import { sigmoid } from '../numerics/loss';
import { rangeIndex } from './categories';
import type { CasePoints, PointsOfRows, PointsScore, PointsTerm } from './types';

function unseenLevel(where: string, t: PointsTerm, value: string): FulcraError {
  return new FulcraError(
    'unseen-level',
    `${where}, column "${t.column}": the value "${value}" is not a category of the points score (known: ` +
      `${t.categories.map((c) => c.level).join(', ')}).`,
    'Recode the value to one of the known levels or remove the row.',
  );
}

function notNumber(where: string, t: PointsTerm, value: string): FulcraError {
  return new FulcraError(
    'not-numeric',
    `${where}, column "${t.column}": the value "${value}" is not a number, and the points score reads this ` +
      'column as numbers.',
    'Correct the value or remove the row.',
  );
}

/** The category index of a value of term t (a level, or a number in the term's ranges); null when missing. */
function categoryOf(t: PointsTerm, value: string | number | null | undefined, where: string): number | null {
  if (value === null || value === undefined || value === '') return null;
  if (t.kind === 'categorical') {
    const text = typeof value === 'number' ? (Number.isNaN(value) ? '' : String(value)) : value;
    if (text === '') return null;
    const k = t.categories.findIndex((c) => c.level === text);
    if (k < 0) throw unseenLevel(where, t, text);
    return k;
  }
  const x = typeof value === 'number' ? value : parseDecimal(value);
  if (typeof value === 'number' && Number.isNaN(value)) return null;
  if (!Number.isFinite(x)) throw notNumber(where, t, String(value));
  return rangeIndex(t.categories, x);
}

/**
 * One case's points, for the card: `values` maps column names to the case's values (numbers, or text as a
 * spreadsheet cell holds it; null, undefined, '' or NaN for missing). Each term's category, its label and points,
 * the total and the table's risk; total and risk are null when a value is missing (listed in `missing`). A level
 * the score does not know, or text in a numeric column, throws FulcraError naming the column.
 */
export function casePoints(score: PointsScore, values: Record<string, string | number | null | undefined>): CasePoints {
  const missing: string[] = [];
  let total = 0;
  const terms = score.terms.map((t) => {
    const k = categoryOf(t, values[t.column], 'The case');
    if (k === null) {
      missing.push(t.column);
      return { term: t.term, column: t.column, category: null, label: null, points: null };
    }
    const c = t.categories[k];
    total += c.points;
    return { term: t.term, column: t.column, category: k, label: c.label, points: c.points };
  });
  if (missing.length > 0) return { total: null, risk: null, terms, missing };
  return { total, risk: sigmoid(score.baseLinearPredictor + score.baseUnit.logOdds * total), terms, missing };
}

/** Per data row: the category index of term t, −1 when missing. Throws naming the spreadsheet row of a bad value. */
function categoryCodes(t: PointsTerm, col: Column, data: Dataset, rows: Int32Array): Int32Array {
  const out = new Int32Array(rows.length);
  if (col.kind === 'categorical') {
    const map = col.levels.map((l) => {
      try {
        return categoryOf(t, l, '');
      } catch {
        return -2;
      }
    });
    for (let i = 0; i < rows.length; i++) {
      const code = col.codes[rows[i]];
      const k = code < 0 ? -1 : map[code];
      if (k === -2) categoryOf(t, col.levels[code], `Row ${sheetRow(data, rows[i])}`);
      out[i] = k ?? -1;
    }
    return out;
  }
  for (let i = 0; i < rows.length; i++) {
    const v = col.values[rows[i]];
    out[i] = Number.isNaN(v) ? -1 : (categoryOf(t, v, `Row ${sheetRow(data, rows[i])}`) ?? -1);
  }
  return out;
}

/**
 * Every row's points on a dataset (scoring a file, or the rows the model used): total, linear predictor
 * baseLinearPredictor + B·total and the table's risk, for the rows with a value in every column the score reads
 * (among `rows`, default all); rows with a missing value are left out and counted per column. A level the score
 * does not know or text in a numeric column throws FulcraError naming the spreadsheet row and column.
 */
export function pointsOfRows(score: PointsScore, data: Dataset, opts: { rows?: Int32Array } = {}): PointsOfRows {
  const candidate = opts.rows ?? Int32Array.from({ length: data.nRows }, (_, i) => i);
  const codes = score.terms.map((t) => categoryCodes(t, getColumn(data, t.column), data, candidate));
  const droppedByColumn: Record<string, number> = {};
  const keep = new Uint8Array(candidate.length).fill(1);
  score.terms.forEach((t, j) => {
    let k = 0;
    for (let i = 0; i < candidate.length; i++)
      if (codes[j][i] < 0) {
        keep[i] = 0;
        k++;
      }
    if (k > 0) droppedByColumn[t.column] = (droppedByColumn[t.column] ?? 0) + k;
  });
  const n = keep.reduce((a, b) => a + b, 0);
  const rowsUsed = new Int32Array(n),
    totals = new Float64Array(n),
    linearPredictor = new Float64Array(n),
    risks = new Float64Array(n);
  const B = score.baseUnit.logOdds;
  for (let i = 0, m = 0; i < candidate.length; i++) {
    if (!keep[i]) continue;
    let s = 0;
    for (let j = 0; j < score.terms.length; j++) s += score.terms[j].categories[codes[j][i]].points;
    rowsUsed[m] = candidate[i];
    totals[m] = s;
    linearPredictor[m] = score.baseLinearPredictor + B * s;
    risks[m] = sigmoid(linearPredictor[m]);
    m++;
  }
  return { totals, linearPredictor, risks, rowsUsed, nDropped: candidate.length - n, droppedByColumn };
}
