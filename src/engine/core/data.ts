/**
 * Columnar data as the engine sees it. Structured-clone safe (typed arrays and plain objects only),
 * so a Dataset crosses the worker boundary unchanged and can be transferred.
 *
 * - numeric: Float64Array, NaN marks a missing cell.
 * - categorical: Int32Array of level codes into `levels`, -1 marks a missing cell.
 *   A binary column is a categorical column with two levels.
 */
export interface NumericColumn {
  kind: 'numeric';
  name: string;
  values: Float64Array;
}

export interface CategoricalColumn {
  kind: 'categorical';
  name: string;
  codes: Int32Array;
  levels: string[];
}

export type Column = NumericColumn | CategoricalColumn;

export interface Dataset {
  nRows: number;
  columns: Column[];
  /**
   * Spreadsheet row number of data row 0 (default 2: the header is row 1). A file read without a header row
   * starts at 1; a sheet whose header sits lower starts further down.
   */
  firstRow?: number;
  /**
   * The spreadsheet row number of every data row, present only when they are not consecutive (the importer skips
   * blank rows but counts them, so a row after a gap keeps its number from the file).
   */
  rowNumbers?: Int32Array;
}

/** The spreadsheet row number of 0-based data row `index`: every engine message that names a row uses it. */
export function sheetRow(data: Pick<Dataset, 'firstRow' | 'rowNumbers'>, index: number): number {
  const listed = data.rowNumbers?.[index];
  return listed !== undefined ? listed : (data.firstRow ?? 2) + index;
}

/** The row-number fields of `data` for a dataset holding the same rows (both absent stay absent). */
export function rowNumbering(data: Pick<Dataset, 'firstRow' | 'rowNumbers'>): Pick<Dataset, 'firstRow' | 'rowNumbers'> {
  const out: Pick<Dataset, 'firstRow' | 'rowNumbers'> = {};
  if (data.firstRow !== undefined) out.firstRow = data.firstRow;
  if (data.rowNumbers !== undefined) out.rowNumbers = data.rowNumbers;
  return out;
}

/** Finds a column by name or throws a FulcraError naming the column and the columns that exist. */
export function getColumn(data: Dataset, name: string): Column {
  const col = data.columns.find((c) => c.name === name);
  if (!col) {
    const known = data.columns.map((c) => c.name).join(', ');
    throw new FulcraError('unknown-column', `There is no column named "${name}". Columns are: ${known}.`);
  }
  return col;
}

export function isMissing(col: Column, row: number): boolean {
  return col.kind === 'numeric' ? Number.isNaN(col.values[row]) : col.codes[row] < 0;
}

/** A typed error with a code, for invalid arguments (bad data yields warnings instead). */
export class FulcraError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly suggestion?: string,
  ) {
    super(message);
    this.name = 'FulcraError';
  }
}
