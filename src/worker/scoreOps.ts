import { sheetRow, warning, type Column, type Dataset, type EngineWarning, type FitResult } from '../engine/core';
import { predict, predictOne } from '../engine/fitting';
import { predictionsCsvChunks } from '../io/export/predictionsCsv';
import type { ImportResult } from '../io/types';
import type { BatchScoreView, OutsideValue, ScoreView } from './protocol';
import { requireFit, type Session } from './session';

/** How many outside or unknown rows a view and a warning name; the counts cover them all. */
const FIRST = 10;

/** The values of `record` outside the [min, max] of their predictor over the fitted rows (none without ranges). */
export function outsideValues(fit: FitResult, record: Record<string, string | number | null>): OutsideValue[] {
  const out: OutsideValue[] = [];
  for (const [column, [min, max]] of Object.entries(fit.recipe.ranges ?? {})) {
    const v = record[column];
    const x = typeof v === 'number' ? v : typeof v === 'string' && v.trim() !== '' ? Number(v) : NaN;
    if (x < min || x > max) out.push({ column, value: x, min, max });
  }
  return out;
}

/** Risk of one case entered in the form, with its CI, whether it is flagged (risk ≥ cut-off), values outside. */
export function scoreOne(s: Session, values: Record<string, string | number | null>, threshold: number): ScoreView {
  const fit = requireFit(s);
  const r = predictOne(fit, values);
  return { ...r, flagged: r.risk >= threshold, threshold, outside: outsideValues(fit, values) };
}

/** Rows whose category in a categorical predictor is one the model was not fitted with (first one per row). */
function unknownCategories(fit: FitResult, data: Dataset): Map<number, { column: string; value: string }> {
  const found = new Map<number, { column: string; value: string }>();
  for (const t of fit.recipe.terms) {
    if (t.type !== 'categorical') continue;
    const col = data.columns.find((c) => c.name === t.column);
    if (!col) continue;
    const known = new Set(t.levels);
    for (let r = 0; r < data.nRows; r++) {
      const value =
        col.kind === 'categorical'
          ? col.codes[r] < 0
            ? null
            : col.levels[col.codes[r]]
          : Number.isNaN(col.values[r])
            ? null
            : String(col.values[r]);
      if (value !== null && !known.has(value) && !found.has(r)) found.set(r, { column: t.column, value });
    }
  }
  return found;
}

/** The rows `keep` of `data`, keeping every row's spreadsheet number. */
function subset(data: Dataset, keep: Int32Array): Dataset {
  const cols: Column[] = data.columns.map((c) =>
    c.kind === 'numeric'
      ? { ...c, values: Float64Array.from(keep, (r) => c.values[r]) }
      : { ...c, codes: Int32Array.from(keep, (r) => c.codes[r]) },
  );
  return { nRows: keep.length, columns: cols, rowNumbers: Int32Array.from(keep, (r) => sheetRow(data, r)) };
}

const rowList = (rows: number[], total: number) => rows.slice(0, FIRST).join(', ') + (total > FIRST ? ', …' : '');

/**
 * Expected events per scored row (trials × risk) when the model was fitted on a table of counts and the file has
 * its counts (trials, or events and non-events); null otherwise.
 */
function expectedEvents(
  recipe: FitResult['recipe'],
  data: Dataset,
  rowsUsed: Int32Array,
  risk: Float64Array,
): Float64Array | null {
  const layout = recipe.layout;
  if (!layout || layout.kind === 'binary') return null;
  const col = (name: string) => data.columns.find((c) => c.name === name);
  const value = (name: string) => {
    const c = col(name);
    if (!c) return null;
    return (r: number) => (c.kind === 'numeric' ? c.values[r] : c.codes[r] < 0 ? NaN : Number(c.levels[c.codes[r]]));
  };
  const trials =
    layout.kind === 'events-trials'
      ? value(layout.trials)
      : (() => {
          const e = value(recipe.outcome);
          const ne = value(layout.nonEvents);
          return e && ne ? (r: number) => e(r) + ne(r) : null;
        })();
  if (!trials) return null;
  return Float64Array.from(rowsUsed, (row, i) => trials(row) * risk[i]);
}

/**
 * Scores every complete row of an imported file. Rows with a missing predictor, or with a category the model was
 * not fitted with, are skipped and reported by spreadsheet row; scored rows with a numeric value outside the fitted
 * data are counted, named, and marked in the CSV's `outside_data` column.
 */
export function scoreImported(s: Session, imported: ImportResult, threshold: number): BatchScoreView {
  const f = requireFit(s);
  const data = imported.dataset;
  const unknown = unknownCategories(f, data);
  const keep = Int32Array.from({ length: data.nRows }, (_, r) => r).filter((r) => !unknown.has(r));
  const r = predict(f, unknown.size ? subset(data, keep) : data);
  const rowsUsed = unknown.size ? Int32Array.from(r.rowsUsed, (i) => keep[i]) : r.rowsUsed;
  const srcRow = (i: number) => imported.sourceRows[rowsUsed[i]];
  const ranges = Object.entries(f.recipe.ranges ?? {}).flatMap(([name, [min, max]]) => {
    const col = data.columns.find((c) => c.name === name);
    return col && col.kind === 'numeric' ? [{ name, values: col.values, min, max }] : [];
  });
  const outside = Array.from(rowsUsed, (row) =>
    ranges.filter((c) => c.values[row] < c.min || c.values[row] > c.max).map((c) => c.name),
  );
  const hasCi = r.lower.some((x) => !Number.isNaN(x));
  const expected = expectedEvents(f.recipe, data, rowsUsed, r.risk);
  const csvParts = [
    ...predictionsCsvChunks(
      data,
      { risk: r.risk, lower: hasCi ? r.lower : null, upper: hasCi ? r.upper : null, rowsUsed, outside, expected },
      { threshold, level: f.level },
    ),
  ];
  const outsideFirst: BatchScoreView['outsideFirst'] = [];
  let outsideRows = 0;
  outside.forEach((columns, i) => {
    if (columns.length === 0) return;
    outsideRows++;
    if (outsideFirst.length < FIRST) outsideFirst.push({ row: srcRow(i), columns });
  });
  const unknownFirst = [...unknown.entries()]
    .slice(0, FIRST)
    .map(([row, u]) => ({ row: imported.sourceRows[row], column: u.column, value: u.value }));
  const warnings: EngineWarning[] = [...imported.warnings, ...r.warnings];
  if (unknown.size)
    warnings.push(
      warning(
        'rows-unknown-category',
        `${unknown.size} ${unknown.size === 1 ? 'row was' : 'rows were'} not scored because a category was not ` +
          'seen when the model was fitted: ' +
          unknownFirst.map((u) => `row ${u.row}, ${u.column} = "${u.value}"`).join('; ') +
          (unknown.size > FIRST ? '; …' : '') +
          '.',
        'Recode the value to one of the known categories, or leave those rows out.',
      ),
    );
  if (outsideRows) {
    const named = `${outsideRows === 1 ? 'row' : 'rows'} ${rowList(
      outsideFirst.map((o) => o.row),
      outsideRows,
    )}`;
    warnings.push(
      warning(
        'values-outside-data',
        `${outsideRows} scored ${outsideRows === 1 ? 'row has' : 'rows have'} a value outside the range of the data ` +
          `the model was fitted on (${named}); their risks are extrapolations.`,
        'Check those values and their units; the column outside_data of the scored file names them.',
      ),
    );
  }
  const n = data.nRows;
  return {
    n,
    scored: r.risk.length,
    skipped: n - r.risk.length,
    preview: Array.from({ length: Math.min(20, r.risk.length) }, (_, i) => ({
      row: srcRow(i),
      risk: r.risk[i],
      lower: r.lower[i],
      upper: r.upper[i],
    })),
    outsideRows,
    expectedEvents: expected ? expected.reduce((a, b) => (Number.isNaN(b) ? a : a + b), 0) : null,
    outsideFirst,
    unknownRows: unknown.size,
    unknownFirst,
    csvParts,
    warnings,
  };
}
