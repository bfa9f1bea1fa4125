import type { Dataset } from '../engine/core';
import type { EngineWarning } from '../engine/core';

/**
 * What a column holds. `identifier`, `text` and `empty` columns are kept in the dataset (as categorical
 * columns) so the user can see them, but are marked not-for-modelling.
 */
export type ColumnType = 'numeric' | 'binary' | 'categorical' | 'date' | 'identifier' | 'text' | 'empty';

export type Delimiter = ',' | ';' | '\t' | '|';
export type DecimalMark = '.' | ',';
export type Encoding = 'utf-8' | 'windows-1252' | 'utf-16le' | 'utf-16be';
export type DateOrder = 'dmy' | 'mdy';

/** Import settings. Every field is optional; 'auto' means "detect from the file". */
export interface ImportOptions {
  /** 'auto' picks by file name: .xlsx → workbook, anything else → delimited text. */
  format?: 'auto' | 'delimited' | 'xlsx';
  delimiter?: 'auto' | Delimiter;
  decimal?: 'auto' | DecimalMark;
  encoding?: 'auto' | Encoding;
  /** Whether the first row holds column names. */
  header?: 'auto' | boolean;
  /** Workbook sheet by name or 0-based index; default the first sheet. */
  sheet?: string | number;
  /** Cell texts read as missing (compared after trimming, case-insensitively). Replaces the default list. */
  missingTokens?: string[];
  /** Type chosen by the user per column name, overriding inference. */
  columnTypes?: Record<string, ColumnType>;
  /** Columns whose cells like "12 mg" are read as the number 12 (the unit is reported, not converted). */
  stripUnits?: string[];
  /** How to read dates like 03/04/2021 when the file does not settle it. */
  dateOrder?: 'auto' | DateOrder;
}

export interface ImportHooks {
  /** fraction in [0, 1]; rowsSoFar counts spreadsheet records read so far. */
  onProgress?: (fraction: number, rowsSoFar: number) => void;
  /** Checked after every chunk; when true the import throws FulcraError('cancelled'). */
  signal?: { aborted: boolean };
  /** Awaited after every chunk, so a worker can yield to its event loop and receive a cancel message. */
  tick?: () => Promise<void>;
}

export interface ColumnProfile {
  n: number;
  missing: number;
  /** 0–100. */
  missingPct: number;
  distinct: number;
  /** Numeric and date columns (dates in epoch days); NaN otherwise or when nothing is present. */
  min: number;
  median: number;
  max: number;
  /** Numeric and date columns: ≤ 20 equal-width bins; `edges` has counts.length + 1 entries. */
  histogram?: { edges: number[]; counts: number[] };
  /** Categorical-like columns: the most frequent levels (up to 20), most frequent first. */
  topLevels?: { level: string; count: number }[];
  /** Count of present cells outside `topLevels`. */
  otherCount?: number;
  /** How often each missing-value token was seen (upper-cased, e.g. { NA: 12, '#DIV/0!': 2 }); empty cells aside. */
  missingTokens?: Record<string, number>;
}

export interface ColumnInfo {
  /** Name in the dataset (made unique and non-blank; see `sourceName`). */
  name: string;
  /** The header text as it was in the file ('' when blank or when there is no header row). */
  sourceName: string;
  /** 0-based position in the file. */
  index: number;
  type: ColumnType;
  /** What inference proposed; differs from `type` when the user chose a type. */
  inferredType: ColumnType;
  /** Plain-words reason for `type`, e.g. "97% of cells are numbers; 3 cells are text: rows 14, 88, 301". */
  reason: string;
  /** false for identifier, free-text and empty columns. */
  modelling: boolean;
  /** Date columns: how values are stored. */
  note?: string;
  profile: ColumnProfile;
  /** Problems in this column (also listed in the result's `warnings`). */
  issues: EngineWarning[];
}

export interface ImportFormat {
  kind: 'delimited' | 'xlsx';
  delimiter: Delimiter | null;
  decimal: DecimalMark;
  encoding: Encoding | null;
  header: boolean;
  /** Spreadsheet row holding the column names (the first non-blank row), 0 without a header. */
  headerRow: number;
  sheet?: string;
  /** All sheet names of a workbook, in workbook order. */
  sheets?: string[];
}

/**
 * The import result; structured-clone safe.
 * Row convention: row numbers in every message are spreadsheet rows as the user sees them — with a header,
 * the header is row 1 and the first data row is row 2; without a header the first data row is row 1.
 * Blank rows are skipped but still counted, so numbers match the file. `sourceRows[i]` is the spreadsheet
 * row of dataset row i.
 */
export interface ImportResult {
  dataset: Dataset;
  columns: ColumnInfo[];
  warnings: EngineWarning[];
  format: ImportFormat;
  sourceRows: Int32Array;
}
