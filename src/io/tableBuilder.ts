import { CELL_MISSING, CellReader } from './cellReader';
import { ColumnBuilder, type RowSample } from './columnBuilder';
import { byteRecordStrings, type ByteRecord } from './byteTokenizer';
import { fieldText, recordStrings, type RecordSpans } from './csvTokenizer';
import { ColumnNamer } from './names';

const SAMPLE = 5;

/** Raw cells of one record: strings from delimited text, typed values from a workbook. */
export type Cell = string | number | boolean | Date | null | undefined;

export interface TextPassColumn {
  dict: Map<string, number>;
  levels: string[];
  counts: number[];
  codes: Int32Array;
}

function note(s: RowSample, row: number, example = ''): void {
  s.count++;
  if (s.rows.length < SAMPLE) {
    s.rows.push(row);
    s.examples.push(example);
  }
}

/** Workbook cells in the form the delimited path sees them; dates as ISO text so date inference applies. */
export function cellToText(c: Cell): string {
  if (c === null || c === undefined) return '';
  if (typeof c === 'string') return c;
  if (typeof c === 'boolean') return c ? 'TRUE' : 'FALSE';
  if (c instanceof Date) {
    const iso = c.toISOString();
    return iso.endsWith('T00:00:00.000Z') ? iso.slice(0, 10) : iso.slice(0, 19).replace('T', ' ');
  }
  return String(c);
}

/**
 * Receives records (header first when `header`), skips blank rows (still counted, so row numbers match the
 * spreadsheet: record k is row k, 1-based), widens on long rows, pads short rows with missing cells.
 * A second, optional pass (`beginTextPass`) re-reads chosen columns as exact cell text.
 */
export class TableBuilder {
  readonly cols: ColumnBuilder[] = [];
  readonly sourceNames: string[] = [];
  readonly namer = new ColumnNamer();
  nRows = 0;
  records = 0;
  sourceRows = new Int32Array(1024);
  readonly blankRows: RowSample = { count: 0, rows: [], examples: [] };
  readonly shortRows: RowSample = { count: 0, rows: [], examples: [] };
  readonly longRows: RowSample = { count: 0, rows: [], examples: [] };
  headerWidth = 0;
  /** Spreadsheet row of the header (the first non-blank row), 0 without a header. */
  headerRow = 0;
  private headerSeen = false;
  private pass2: Map<number, TextPassColumn> | null = null;
  private pass2Row = 0;
  /** Estimate of all records in the input (e.g. its line ends), used only to size the columns; 0 if unknown. */
  expectedRecords = 0;

  constructor(
    readonly reader: CellReader,
    readonly header: boolean,
    private readonly stripUnits: ReadonlySet<string>,
  ) {}

  private addColumn(sourceName: string, fromHeader: boolean): void {
    const name = this.namer.add(sourceName, this.cols.length + 1, fromHeader);
    const left = this.expectedRecords - this.records + (fromHeader ? 0 : 1);
    const b = new ColumnBuilder(
      this.reader,
      this.stripUnits.has(name),
      Math.max(1024, Math.min(this.nRows + left, 1 << 27)),
    );
    b.padTo(this.nRows);
    this.cols.push(b);
    this.sourceNames.push(sourceName);
  }

  addRecord(fields: ArrayLike<Cell>, count: number): void {
    const row = ++this.records;
    let last = count - 1;
    while (last >= 0 && isBlank(fields[last])) last--;
    if (last < 0) {
      if (this.pass2 === null) note(this.blankRows, row);
      return;
    }
    if (this.header && !this.headerSeen) {
      this.headerSeen = true;
      if (this.pass2 !== null) return;
      this.headerRow = row;
      for (let j = 0; j < count; j++) this.addColumn(cellToText(fields[j]), true);
      this.headerWidth = count;
      return;
    }
    if (this.pass2 !== null) return this.textPassRecord(fields, count);
    if (this.cols.length === 0 && !this.header) this.headerWidth = count;
    while (this.cols.length <= last) this.addColumn('', false);
    if (count < this.headerWidth) note(this.shortRows, row, `${count} of ${this.headerWidth}`);
    else if (last >= this.headerWidth) note(this.longRows, row, `${last + 1} of ${this.headerWidth}`);
    const cols = this.cols;
    for (let j = 0; j < cols.length; j++) {
      if (j >= count) {
        cols[j].addMissing();
        continue;
      }
      const c = fields[j];
      if (typeof c === 'string') cols[j].add(c, row);
      else if (typeof c === 'number') cols[j].addNumber(c, row);
      else if (c === null || c === undefined) cols[j].addMissing();
      else cols[j].add(cellToText(c), row);
    }
    this.pushRow(row);
  }

  /** Adds one delimited-text record given as spans; same result as `addRecord(recordStrings(r), r.count)`. */
  addSpans(r: RecordSpans): void {
    const count = r.count;
    if (
      this.pass2 !== null ||
      (this.header && !this.headerSeen) ||
      this.cols.length < count ||
      count < this.headerWidth
    ) {
      this.addRecord(recordStrings(r), count);
      return;
    }
    const text = r.text;
    let blank = true;
    for (let k = 0; k < count && blank; k++) {
      if (r.strs[k] !== null) {
        blank = isBlank(r.strs[k]);
        continue;
      }
      for (let i = r.starts[k]; i < r.ends[k]; i++) {
        const c = text.charCodeAt(i);
        if (c > 32 && c < 127) {
          blank = false;
          break;
        }
        if (c >= 127) {
          blank = isBlank(fieldText(r, k));
          break;
        }
      }
    }
    if (blank) {
      this.addRecord(recordStrings(r), count);
      return;
    }
    const row = ++this.records;
    const cols = this.cols;
    for (let j = 0; j < cols.length; j++) {
      if (j >= count) cols[j].addMissing();
      else if (r.strs[j] !== null) cols[j].add(r.strs[j]!, row);
      else cols[j].addSpan(text, r.starts[j], r.ends[j], row);
    }
    this.pushRow(row);
  }

  /** Adds one record given as byte spans; same result as `addRecord` on its decoded fields. */
  addBytes(r: ByteRecord, decode: (b: Uint8Array) => string): void {
    const count = r.count;
    if (
      this.pass2 !== null ||
      (this.header && !this.headerSeen) ||
      this.cols.length < count ||
      count < this.headerWidth
    ) {
      this.addRecord(byteRecordStrings(r, decode), count);
      return;
    }
    const b = r.bytes;
    let blank = true;
    for (let k = 0; k < count && blank; k++) {
      const str = r.strs[k];
      if (str !== null) {
        blank = isBlank(str);
        continue;
      }
      for (let i = r.starts[k]; i < r.ends[k]; i++) {
        const c = b[i];
        if (c > 32 && c < 127) {
          blank = false;
          break;
        }
        if (c >= 127) {
          blank = isBlank(decode(b.subarray(r.starts[k], r.ends[k])));
          break;
        }
      }
    }
    if (blank) {
      this.addRecord(byteRecordStrings(r, decode), count);
      return;
    }
    const row = ++this.records;
    const cols = this.cols;
    for (let j = 0; j < cols.length; j++) {
      if (j >= count) cols[j].addMissing();
      else if (r.strs[j] !== null) cols[j].add(r.strs[j]!, row);
      else cols[j].addBytes(b, r.starts[j], r.ends[j], row, decode);
    }
    this.pushRow(row);
  }

  private pushRow(row: number): void {
    if (this.nRows === this.sourceRows.length) {
      const g = new Int32Array(this.sourceRows.length * 2);
      g.set(this.sourceRows);
      this.sourceRows = g;
    }
    this.sourceRows[this.nRows++] = row;
  }

  /** Appends the spreadsheet rows of kept rows read elsewhere (parallelParse.ts), moved on by `offset`. */
  appendRows(rows: Int32Array, offset: number): void {
    for (let i = 0; i < rows.length; i++) this.pushRow(rows[i] + offset);
  }

  /** Starts the second pass: the caller then feeds the same records again. */
  beginTextPass(columns: number[]): void {
    this.pass2 = new Map(
      columns.map((j) => [j, { dict: new Map(), levels: [], counts: [], codes: new Int32Array(this.nRows) }]),
    );
    this.records = 0;
    this.pass2Row = 0;
    this.headerSeen = false;
  }

  endTextPass(): Map<number, TextPassColumn> {
    const out = this.pass2 ?? new Map<number, TextPassColumn>();
    this.pass2 = null;
    return out;
  }

  private textPassRecord(fields: ArrayLike<Cell>, count: number): void {
    const i = this.pass2Row++;
    for (const [j, t] of this.pass2!) {
      const raw = j < count ? fields[j] : null;
      if (raw === null || raw === undefined || this.reader.read(cellToText(raw)) === CELL_MISSING) {
        t.codes[i] = -1;
        continue;
      }
      const s = typeof raw === 'number' ? String(raw) : this.reader.text;
      let code = t.dict.get(s);
      if (code === undefined) {
        code = t.levels.length;
        t.dict.set(s, code);
        t.levels.push(s);
        t.counts.push(0);
      }
      t.counts[code]++;
      t.codes[i] = code;
    }
  }

  /** Final exact-length copy of the spreadsheet row numbers of the kept rows. */
  rowNumbers(): Int32Array {
    return this.sourceRows.slice(0, this.nRows);
  }
}

function isBlank(c: Cell): boolean {
  return c === null || c === undefined || (typeof c === 'string' && c.trim().length === 0);
}
