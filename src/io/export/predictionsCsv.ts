import { FulcraError, type Dataset } from '../../engine/core';

export interface PredictionsForCsv {
  /** Predicted risk per scored row (same order as rowsUsed). */
  risk: Float64Array;
  lower?: Float64Array | null;
  upper?: Float64Array | null;
  /** Dataset row index of each scored row; rows not listed could not be scored (missing value) and get empty cells. */
  rowsUsed: Int32Array;
  /**
   * Per scored row (same order as rowsUsed): the predictors whose value lies outside the range of the data the
   * model was fitted on. When given, an `outside_data` column lists them ("; " between names, empty otherwise).
   */
  outside?: readonly (readonly string[])[] | null;
  /**
   * Per scored row (same order as rowsUsed): expected events = trials × risk, for a file of counts scored with a
   * model fitted on counts; an `expected events` column when given (NaN: no count in that row).
   */
  expected?: Float64Array | null;
}

export interface PredictionsCsvOptions {
  /** Flag column "1"/"0" when risk ≥ threshold (the workbench's flag rule); omitted when null/undefined. */
  threshold?: number | null;
  /** CI level for the header of the interval columns (default 0.95). */
  level?: number;
  delimiter?: ',' | ';' | '\t';
  /** Decimal mark for the numbers Fulcra writes; ',' needs a delimiter other than ','. */
  decimal?: '.' | ',';
  /** Line ending, CRLF by default (RFC 4180). */
  newline?: '\r\n' | '\n';
}

/** Characters that make a spreadsheet read a cell as a formula (OWASP "CSV Injection"). */
const FORMULA_START = /^[=+\-@\t\r]/;
/** A plain decimal number: optional sign, digits with an optional fraction, optional exponent. */
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Neutralises spreadsheet formula injection in one text cell (OWASP CSV Injection guidance): a cell starting
 * with = + - @, tab or carriage return gets a leading single quote ' — except a cell that is exactly a plain
 * number (e.g. "-1.5", "+2", "-3e-4", or "-1,5" when `decimal` is ','), which stays a number.
 */
export function neutraliseCell(text: string, decimal: '.' | ',' = '.'): string {
  if (!FORMULA_START.test(text)) return text;
  const asNumber = decimal === ',' ? text.replace(',', '.') : text;
  if (PLAIN_NUMBER.test(asNumber) && !(decimal === ',' && text.includes('.'))) return text;
  return `'${text}`;
}

/** RFC 4180 quoting: a field containing the delimiter, a double quote, CR or LF is quoted, quotes doubled. */
export function quoteField(text: string, delimiter: string): string {
  return text.includes(delimiter) || /["\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * The original columns plus the predicted risk (with its interval when given) and the flag at the threshold,
 * as CSV text (header row first, every dataset row in order). Numbers are written with round-trip precision;
 * missing cells are empty. Text cells (category labels, headers) pass through neutraliseCell, then quoteField.
 */
export function predictionsCsv(data: Dataset, pred: PredictionsForCsv, options: PredictionsCsvOptions = {}): string {
  return [...predictionsCsvChunks(data, pred, options)].join('');
}

/**
 * The same CSV text as predictionsCsv, in chunks of `rowsPerChunk` lines (header in the first chunk), so a large
 * file can be assembled as `new Blob([...chunks])` without one huge string. Arguments are checked before the first
 * chunk.
 */
export function predictionsCsvChunks(
  data: Dataset,
  pred: PredictionsForCsv,
  options: PredictionsCsvOptions = {},
  rowsPerChunk = 20_000,
): Generator<string> {
  const decimal = options.decimal ?? '.';
  const delimiter = options.delimiter ?? (decimal === ',' ? ';' : ',');
  if (decimal === ',' && delimiter === ',')
    throw new FulcraError(
      'csv-delimiter',
      'A decimal comma needs a delimiter other than a comma.',
      'Use ";" or tab as the delimiter.',
    );
  const nl = options.newline ?? '\r\n';
  const level = options.level ?? 0.95;
  const t = options.threshold;
  if (t !== undefined && t !== null && !(t >= 0 && t <= 1))
    throw new FulcraError('bad-threshold', `The threshold must be between 0 and 1, got ${t}.`);
  if (pred.risk.length !== pred.rowsUsed.length)
    throw new FulcraError(
      'prediction-length',
      `There are ${pred.risk.length} risks for ${pred.rowsUsed.length} scored rows.`,
    );
  const hasCi = !!pred.lower && !!pred.upper;
  const outside = pred.outside ?? null;
  if (outside && outside.length !== pred.rowsUsed.length)
    throw new FulcraError(
      'prediction-length',
      `There are ${outside.length} range checks for ${pred.rowsUsed.length} scored rows.`,
    );

  const byRow = new Int32Array(data.nRows).fill(-1);
  pred.rowsUsed.forEach((r, i) => {
    if (r < 0 || r >= data.nRows)
      throw new FulcraError('prediction-row', `Scored row index ${r} is outside the dataset (0…${data.nRows - 1}).`);
    byRow[r] = i;
  });

  const taken = new Set(data.columns.map((c) => c.name));
  const unique = (name: string): string => {
    let s = name;
    while (taken.has(s)) s += ' (Fulcra)';
    taken.add(s);
    return s;
  };
  const pct = `${+(100 * level).toPrecision(6)}%`;
  const extra = [unique('predicted risk')];
  if (hasCi) extra.push(unique(`risk lower ${pct} CI`), unique(`risk upper ${pct} CI`));
  if (t !== undefined && t !== null) extra.push(unique(`flagged at risk >= ${num(t, decimal)}`));
  if (outside) extra.push(unique('outside_data'));
  const expected = pred.expected ?? null;
  if (expected) extra.push(unique('expected events (trials × risk)'));

  const cell = (s: string) => quoteField(neutraliseCell(s, decimal), delimiter);
  const header = [...data.columns.map((c) => c.name), ...extra].map(cell).join(delimiter);
  const line = (r: number): string => {
    const out: string[] = [];
    for (const c of data.columns) {
      if (c.kind === 'numeric') out.push(quoteField(num(c.values[r], decimal), delimiter));
      else out.push(c.codes[r] < 0 ? '' : cell(c.levels[c.codes[r]]));
    }
    const i = byRow[r];
    out.push(i < 0 ? '' : num(pred.risk[i], decimal));
    if (hasCi) out.push(i < 0 ? '' : num(pred.lower![i], decimal), i < 0 ? '' : num(pred.upper![i], decimal));
    if (t !== undefined && t !== null)
      out.push(i < 0 || Number.isNaN(pred.risk[i]) ? '' : pred.risk[i] >= t ? '1' : '0');
    if (outside) out.push(i < 0 ? '' : cell(outside[i].join('; ')));
    if (expected) out.push(i < 0 ? '' : num(expected[i], decimal));
    return out.join(delimiter);
  };
  return (function* () {
    yield header + nl;
    for (let start = 0; start < data.nRows; start += rowsPerChunk) {
      const lines: string[] = [];
      for (let r = start; r < Math.min(data.nRows, start + rowsPerChunk); r++) lines.push(line(r));
      yield lines.join(nl) + nl;
    }
  })();
}

function num(v: number, decimal: '.' | ','): string {
  if (Number.isNaN(v)) return '';
  const s = String(v);
  return decimal === ',' ? s.replace('.', ',') : s;
}
