import type { Column } from '../engine/core';
import { warning, type EngineWarning } from '../engine/core';
import type { ColumnBuilder } from './columnBuilder';
import { parseDateText } from './dates';
import { inferType, type Inference } from './inferType';
import type { ResolvedOptions } from './options';
import { summarizeNumbers, type NumericSummary } from './numericSummary';
import { profileColumn } from './profile';
import { plural, pct, rowList, rowListWithText } from './rows';
import type { TableBuilder, TextPassColumn } from './tableBuilder';
import type { ColumnInfo, ColumnType } from './types';

export interface ColumnPlan {
  index: number;
  name: string;
  sourceName: string;
  type: ColumnType;
  inference: Inference;
  forced: boolean;
  /** Needs the exact cell text of number cells (second pass). */
  needsText: boolean;
  num: NumericSummary;
}

const TEXTUAL: ReadonlySet<ColumnType> = new Set(['binary', 'categorical', 'identifier', 'text']);
const UNIT_SHARE = 0.5;
const EXCEL_CELL_LIMIT = 32_767;

/** Proposes a type for every column and applies the user's choices. */
export function planColumns(tb: TableBuilder, o: ResolvedOptions): ColumnPlan[] {
  let work: Float64Array | undefined;
  return tb.cols.map((b, index) => {
    const name = tb.namer.names[index];
    if (work === undefined && b.numberCount > 4096) work = new Float64Array(tb.nRows);
    const num = summarizeNumbers(b.values.subarray(0, b.n), work);
    const inference = inferType(b, name, num, o.dateOrder);
    const chosen = o.columnTypes[name];
    const type = chosen ?? inference.type;
    const needsText =
      TEXTUAL.has(type) &&
      b.numberCount > 0 &&
      (b.textCount > 0 || b.leadingZeroCells.count > 0 || b.unitsStripped.size > 0 || b.thousandsCells.count > 0);
    return {
      index,
      name,
      sourceName: tb.sourceNames[index],
      type,
      inference,
      forced: chosen !== undefined,
      needsText,
      num,
    };
  });
}

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'variant' });

/** Levels in order with codes remapped (into `out`, which may be `codes` itself). */
function sortLevels(
  levels: string[],
  codes: Int32Array,
  numeric: boolean,
  out: Int32Array = new Int32Array(codes.length),
): { levels: string[]; codes: Int32Array } {
  const order = levels.map((_, i) => i);
  order.sort(
    numeric
      ? (a, b) => Number(levels[a]) - Number(levels[b])
      : (a, b) => collator.compare(levels[a], levels[b]) || (levels[a] < levels[b] ? -1 : 1),
  );
  const remap = new Int32Array(levels.length);
  order.forEach((old, k) => (remap[old] = k));
  for (let i = 0; i < codes.length; i++) out[i] = codes[i] < 0 ? -1 : remap[codes[i]];
  return { levels: order.map((i) => levels[i]), codes: out };
}

function textualColumn(p: ColumnPlan, b: ColumnBuilder, text: TextPassColumn | undefined): Column {
  const n = b.n;
  if (text) return { kind: 'categorical', name: p.name, ...sortLevels(text.levels, text.codes, false, text.codes) };
  if (b.numberCount === 0) {
    // The builder's codes are not read again, so when they have the exact length they are remapped in place.
    if (b.codes && b.codes.length === n)
      return { kind: 'categorical', name: p.name, ...sortLevels(b.levels, b.codes, false, b.codes) };
    const codes = b.codes ? b.codes.subarray(0, n) : new Int32Array(n).fill(-1);
    return { kind: 'categorical', name: p.name, ...sortLevels(b.levels, codes, false) };
  }
  // The first FEW levels are also looked up by a linear scan (most such columns have two).
  const FEW = 8;
  const few = new Float64Array(FEW);
  const dict = new Map<number, number>();
  const levels: string[] = [];
  const codes = new Int32Array(n);
  const values = b.values;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (v !== v) {
      codes[i] = -1;
      continue;
    }
    let c = -1;
    if (levels.length <= FEW) {
      for (let k = 0; k < levels.length; k++) {
        if (few[k] === v) {
          c = k;
          break;
        }
      }
    } else c = dict.get(v) ?? -1;
    if (c < 0) {
      c = levels.length;
      dict.set(v, c);
      if (c < FEW) few[c] = v;
      levels.push(String(v));
    }
    codes[i] = c;
  }
  return { kind: 'categorical', name: p.name, ...sortLevels(levels, codes, true, codes) };
}

function dateColumn(p: ColumnPlan, b: ColumnBuilder): { col: Column; unparsed: number; rows: number[] } {
  const days = b.levels.map((l) => parseDateText(l, p.inference.dateOrder));
  const values = new Float64Array(b.n).fill(NaN);
  let unparsed = 0;
  const rows: number[] = [];
  for (let i = 0; i < b.n; i++) {
    const c = b.codes ? b.codes[i] : Number.isNaN(b.values[i]) ? -1 : -2;
    if (c === -1) continue;
    const v = c >= 0 ? days[c] : NaN;
    if (Number.isNaN(v)) {
      unparsed++;
      if (rows.length < 5) rows.push(i);
    }
    values[i] = v;
  }
  return { col: { kind: 'numeric', name: p.name, values }, unparsed, rows };
}

/** Builds the engine column, its profile and its issues from a plan (and the second-pass text if any). */
export function buildColumn(
  p: ColumnPlan,
  b: ColumnBuilder,
  text: TextPassColumn | undefined,
  sourceRows: Int32Array,
): { column: Column; info: ColumnInfo } {
  const issues: EngineWarning[] = [];
  const q = `Column "${p.name}"`;
  const add = (code: string, message: string, suggestion: string) =>
    issues.push(warning(code, message, suggestion, [p.name]));
  const present = b.numberCount + b.textCount;
  let column: Column;
  let note: string | undefined;
  if (p.type === 'numeric') {
    column = { kind: 'numeric', name: p.name, values: b.values.length === b.n ? b.values : b.values.slice(0, b.n) };
    if (b.textCount > 0) {
      add(
        'text-in-numeric',
        `${q}: ${plural(b.textCount, 'cell is', 'cells are')} text, not numbers — ` +
          `${rowListWithText(b.textCells)}; read as missing.`,
        'Correct those cells in the file, add the text to the missing-value list, ' +
          'or choose the type "categorical" if the text matters.',
      );
    }
    if (b.leadingZeroCells.count > 0) {
      add(
        'leading-zeros-lost',
        `${q}: ${plural(b.leadingZeroCells.count, 'number has', 'numbers have')} leading zeros ` +
          `(${rowListWithText(b.leadingZeroCells)}); as numbers the zeros are dropped.`,
        'If these are codes rather than amounts, choose the type "identifier" or "categorical".',
      );
    }
  } else if (p.type === 'date') {
    const d = dateColumn(p, b);
    column = d.col;
    note = 'Dates are stored as days since 1970-01-01 (UTC); times of day as fractions of a day.';
    if (d.unparsed > 0) {
      add(
        'unreadable-dates',
        `${q}: ${plural(d.unparsed, 'cell is not a date', 'cells are not dates')} ` +
          `(rows ${d.rows.map((i) => sourceRows[i]).join(', ')}${d.unparsed > 5 ? ' …' : ''}); read as missing.`,
        'Write the dates as YYYY-MM-DD or day/month/year in the file, or choose another type.',
      );
    }
    if (!p.inference.dateOrderSettled) {
      const order = p.inference.dateOrder === 'dmy' ? 'day/month/year' : 'month/day/year';
      add(
        p.inference.dateOrderConflict ? 'conflicting-date-order' : 'ambiguous-date-order',
        p.inference.dateOrderConflict
          ? `${q}: some dates only make sense as day/month and others only as month/day; ` +
              `read as ${order}, so some are missing.`
          : `${q}: dates like 03/04/2021 could be day/month or month/day; read as ${order}.`,
        'Choose the date order in the import settings if this is wrong.',
      );
    }
  } else if (p.type === 'empty') {
    column = { kind: 'categorical', name: p.name, codes: new Int32Array(b.n).fill(-1), levels: [] };
  } else {
    column = textualColumn(p, b, text);
    if (p.type === 'binary' && column.kind === 'categorical' && column.levels.length !== 2) {
      add(
        'not-two-levels',
        `${q} was set to yes/no type but has ${plural(column.levels.length, 'distinct value')}.`,
        'Choose "categorical", or make the column hold exactly two values.',
      );
    }
  }
  if (present === 0) {
    add(
      'all-missing',
      `${q}: every cell is missing.`,
      'Leave this column out of the model, or check that the right file was opened.',
    );
  } else if (b.missingCount > 0 && b.missingCount / b.n > 0.5) {
    add(
      'mostly-missing',
      `${q}: ${pct(b.missingCount, b.n)} of cells are missing.`,
      'A model using this column would drop most rows; consider leaving it out.',
    );
  }
  const profile = profileColumn(column, p.type === 'numeric' ? p.num : undefined);
  if (b.tokenCounts.size > 0) profile.missingTokens = Object.fromEntries(b.tokenCounts);
  if (present > 0 && profile.distinct === 1 && p.type !== 'identifier') {
    add(
      'constant',
      `${q} has the same value in every present cell, so it cannot explain anything.`,
      'Leave it out of the model.',
    );
  }
  if (b.errorCells.count > 0) {
    add(
      'spreadsheet-errors',
      `${q}: ${plural(b.errorCells.count, 'cell holds a spreadsheet error', 'cells hold spreadsheet errors')} — ` +
        `${rowListWithText(b.errorCells)}; read as missing.`,
      'Fix the formulas in the spreadsheet and save it again.',
    );
  }
  if (b.thousandsCells.count > 0) {
    add(
      'thousands-separator',
      `${q}: ${plural(b.thousandsCells.count, 'number was', 'numbers were')} written with thousands separators — ` +
        `${rowListWithText(b.thousandsCells)}; read without them.`,
      'If those marks were decimal marks, choose the decimal mark in the import settings.',
    );
  }
  if (b.unitsStripped.size > 0) {
    const units = [...b.unitsStripped].map(([u, c]) => `${u} (${c})`).join(', ');
    add(
      'units-stripped',
      `${q}: units removed as asked: ${units}. The numbers were not converted.`,
      'Check that all cells use the same unit.',
    );
    if (b.unitsStripped.size > 1) {
      add(
        'mixed-units',
        `${q} has cells in different units (${[...b.unitsStripped.keys()].join(', ')}); ` +
          'they are not comparable as they stand.',
        'Convert the cells to one unit in the file before modelling.',
      );
    }
  } else if (b.textCount > 0 && p.type !== 'numeric' && p.type !== 'date') {
    unitIssue(b, q, add);
  }
  caseVariants(column, q, add);
  if (b.maxLength > EXCEL_CELL_LIMIT) {
    add(
      'huge-cell',
      `${q}: the cell at row ${b.maxLengthRow} holds ${plural(b.maxLength, 'character')}, ` +
        'more than a spreadsheet cell can.',
      'This often means a quote was never closed; check the file around that row.',
    );
  }
  const info: ColumnInfo = {
    name: p.name,
    sourceName: p.sourceName,
    index: p.index,
    type: p.type,
    inferredType: p.inference.type,
    reason:
      p.forced && p.type !== p.inference.type
        ? `chosen by you (inferred ${p.inference.type}: ${p.inference.reason})`
        : p.inference.reason,
    modelling: p.type !== 'identifier' && p.type !== 'text' && p.type !== 'empty',
    profile,
    issues,
  };
  if (note) info.note = note;
  return { column, info };
}

function unitIssue(b: ColumnBuilder, q: string, add: (c: string, m: string, s: string) => void): void {
  const re = /^[$€£¥]?\s*[+-]?\d[\d.,\u00a0 ]*\s*[A-Za-zµμ%‰°]/;
  let withUnit = 0;
  const units = new Set<string>();
  let example = '';
  for (let i = 0; i < b.levels.length; i++) {
    const l = b.levels[i];
    if (re.test(l) || /^[$€£¥]\s*\d/.test(l)) {
      withUnit += b.levelCounts[i];
      if (!example) example = l;
      units.add(l.replace(/^[$€£¥]?\s*[+-]?[\d.,\u00a0 ]*\s*/, '') || l.charAt(0));
    }
  }
  if (withUnit > 0 && withUnit >= UNIT_SHARE * b.textCount) {
    add(
      'units-in-cells',
      `${q}: ${plural(withUnit, 'cell has', 'cells have')} a number with a unit (e.g. "${example}"), ` +
        'so the column is read as text.',
      `To use the numbers, choose "strip units" for this column (units seen: ${[...units].slice(0, 5).join(', ')}).`,
    );
  }
}

function caseVariants(col: Column, q: string, add: (c: string, m: string, s: string) => void): void {
  if (col.kind !== 'categorical' || col.levels.length > 1000) return;
  const seen = new Map<string, string>();
  for (const l of col.levels) {
    const k = l.toLowerCase().replace(/\s+/g, ' ');
    const prev = seen.get(k);
    if (prev !== undefined) {
      add(
        'case-variants',
        `${q} has values that differ only in capitals or spaces: "${prev}" and "${l}"; they are kept apart.`,
        'If they mean the same, write them the same way in the file.',
      );
      return;
    }
    seen.set(k, l);
  }
}

/** Table-level messages about the rows. */
export function rowWarnings(tb: TableBuilder): EngineWarning[] {
  const w: EngineWarning[] = [];
  if (tb.blankRows.count > 0) {
    w.push(
      warning(
        'blank-rows',
        `${plural(tb.blankRows.count, 'blank row was', 'blank rows were')} skipped (${rowList(tb.blankRows)}).`,
        'Nothing to do; row numbers in messages still match the file.',
      ),
    );
  }
  if (tb.shortRows.count > 0) {
    w.push(
      warning(
        'short-rows',
        `${plural(tb.shortRows.count, 'row has', 'rows have')} fewer cells than the header ` +
          `(${rowList(tb.shortRows)}: ${tb.shortRows.examples[0]} cells); the missing cells are read as missing.`,
        'Check those rows in the file: a cell may have been left out, shifting the others.',
      ),
    );
  }
  if (tb.longRows.count > 0) {
    w.push(
      warning(
        'long-rows',
        `${plural(tb.longRows.count, 'row has', 'rows have')} more cells than the header ` +
          `(${rowList(tb.longRows)}: ${tb.longRows.examples[0]} cells); extra columns named "column_N" were added.`,
        'Check those rows in the file: a separator inside a value may need quotes around the value.',
      ),
    );
  }
  let trimmed = 0;
  let where = '';
  tb.cols.forEach((b, j) => {
    trimmed += b.trimmedCells.count;
    if (!where && b.trimmedCells.count > 0) where = `row ${b.trimmedCells.rows[0]}, column "${tb.namer.names[j]}"`;
  });
  if (trimmed > 0) {
    w.push(
      warning(
        'spaces-trimmed',
        `Spaces around ${plural(trimmed, 'cell value')} were removed (first at ${where}).`,
        'Nothing to do unless spaces were meaningful.',
      ),
    );
  }
  return w;
}
