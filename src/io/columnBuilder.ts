import { CELL_MISSING, CELL_NUMBER, type CellReader } from './cellReader';
import { ByteDict } from './byteDict';
import { parseByteNumber, parseSpanNumber, splitUnit } from './cellText';

const SAMPLE = 5;

/** First few spreadsheet rows and a count, for messages like "rows 14, 88, 301 and 12 more". */
export interface RowSample {
  count: number;
  rows: number[];
  examples: string[];
}

function note(s: RowSample, row: number, example: string): void {
  s.count++;
  if (s.rows.length < SAMPLE) {
    s.rows.push(row);
    s.examples.push(example.length > 40 ? example.slice(0, 40) + '…' : example);
  }
}

function sample(): RowSample {
  return { count: 0, rows: [], examples: [] };
}

/**
 * Accumulates one column while rows stream in: numbers in a Float64Array (NaN = missing or text),
 * text cells dictionary-encoded (codes: -1 missing, -2 a number cell), plus the counts that type
 * inference and the column's messages need. Cells are not kept as strings.
 */
export class ColumnBuilder {
  n = 0;
  values: Float64Array;
  codes: Int32Array | null = null;
  readonly dict = new Map<string, number>();
  readonly levels: string[] = [];
  readonly levelCounts: number[] = [];
  numberCount = 0;
  textCount = 0;
  missingCount = 0;
  readonly tokenCounts = new Map<string, number>();
  readonly textCells = sample();
  readonly errorCells = sample();
  readonly thousandsCells = sample();
  readonly leadingZeroCells = sample();
  readonly trimmedCells = sample();
  readonly unitsStripped = new Map<string, number>();
  maxLength = 0;
  maxLengthRow = 0;

  private readonly fastNumbers: boolean;
  /** Cell bytes already seen → level code (≥ 0), -1 "read it the slow way", ≤ -2 a missing token. */
  private readonly byteDict = new ByteDict();
  private readonly byteTokens: string[] = [];
  private readonly decimalCode: number;

  constructor(
    private readonly reader: CellReader,
    private readonly stripUnits: boolean,
    capacity = 1024,
  ) {
    this.values = new Float64Array(Math.max(16, capacity));
    this.fastNumbers = !reader.hasNumericTokens;
    this.decimalCode = reader.decimalComma ? 44 : 46;
  }

  /** Appends missing cells so that a column created late (a ragged row) lines up with the others. */
  padTo(n: number): void {
    while (this.n < n) this.addMissing();
  }

  addMissing(): void {
    this.push(NaN, -1);
    this.missingCount++;
  }

  addNumber(v: number, row: number): void {
    if (!Number.isFinite(v)) {
      note(this.textCells, row, String(v));
    }
    this.numberCount++;
    this.push(v, -2);
  }

  /**
   * Adds the cell text[start, end) — numbers are read in place; anything else goes through `add`.
   * Same result as `add(text.slice(start, end), row)`.
   */
  addSpan(text: string, start: number, end: number, row: number): void {
    const len = end - start;
    if (len === 0) {
      this.addMissing();
      return;
    }
    if (this.fastNumbers) {
      const a = text.charCodeAt(start),
        b = text.charCodeAt(end - 1);
      if (a > 32 && b > 32 && a !== 160 && b !== 160) {
        const v = parseSpanNumber(text, start, end, this.decimalCode);
        if (v === v) {
          if (len > this.maxLength) {
            this.maxLength = len;
            this.maxLengthRow = row;
          }
          if (a === 48 && len > 1) {
            const c = text.charCodeAt(start + 1);
            if (c >= 48 && c <= 57) note(this.leadingZeroCells, row, text.slice(start, end));
          }
          this.numberCount++;
          this.push(v, -2);
          return;
        }
      }
    }
    this.add(text.slice(start, end), row);
  }

  add(raw: string, row: number): void {
    const r = this.reader;
    if (raw.length > this.maxLength) {
      this.maxLength = raw.length;
      this.maxLengthRow = row;
    }
    const kind = r.read(raw);
    if (kind === CELL_MISSING) {
      if (r.token !== '') {
        this.tokenCounts.set(r.token, (this.tokenCounts.get(r.token) ?? 0) + 1);
        if (r.isError) note(this.errorCells, row, r.token);
      }
      this.addMissing();
      return;
    }
    if (r.trimmed) note(this.trimmedCells, row, raw);
    if (kind === CELL_NUMBER) {
      if (r.thousands) note(this.thousandsCells, row, r.text);
      if (r.leadingZero) note(this.leadingZeroCells, row, r.text);
      this.numberCount++;
      this.push(r.value, -2);
      return;
    }
    if (this.stripUnits) {
      const u = splitUnit(r.text, r.decimalComma);
      if (u) {
        this.unitsStripped.set(u.unit, (this.unitsStripped.get(u.unit) ?? 0) + 1);
        this.numberCount++;
        this.push(u.value, -2);
        return;
      }
    }
    this.addText(r.text, row);
  }

  addText(s: string, row: number): void {
    this.addLevel(this.levelCode(s), s, row);
  }

  /** The code of text level `s`, a new one (count 0) when it has not been seen. */
  levelCode(s: string): number {
    let code = this.dict.get(s);
    if (code === undefined) {
      code = this.levels.length;
      this.dict.set(s, code);
      this.levels.push(s);
      this.levelCounts.push(0);
    }
    return code;
  }

  /** Codes for the cells so far, made when the first text cell arrives (−1 missing, −2 a number). */
  ensureCodes(): Int32Array {
    if (this.codes === null) {
      this.codes = new Int32Array(this.values.length);
      for (let i = 0; i < this.n; i++) this.codes[i] = Number.isNaN(this.values[i]) ? -1 : -2;
    }
    return this.codes;
  }

  /**
   * Adds the cell bytes[start, end) of an ASCII-compatible encoding; same result as
   * `add(decode(bytes.subarray(start, end)), row)`. Numbers are read in place and repeated texts are
   * recognised by their bytes, so most cells are never decoded.
   */
  addBytes(b: Uint8Array, start: number, end: number, row: number, decode: (x: Uint8Array) => string): void {
    const len = end - start;
    if (len === 0) {
      this.addMissing();
      return;
    }
    const first = b[start],
      last = b[end - 1];
    if (first > 32 && last > 32) {
      if (this.fastNumbers && first < 127 && last < 127) {
        const v = parseByteNumber(b, start, end, this.decimalCode);
        if (v === v) {
          if (len > this.maxLength) {
            this.maxLength = len;
            this.maxLengthRow = row;
          }
          if (first === 48 && len > 1 && b[start + 1] >= 48 && b[start + 1] <= 57)
            note(this.leadingZeroCells, row, decode(b.subarray(start, end)));
          this.numberCount++;
          this.push(v, -2);
          return;
        }
      }
      const known = this.byteDict.get(b, start, end);
      if (known !== undefined && known >= 0) {
        const s = this.levels[known];
        if (s.length > this.maxLength) {
          this.maxLength = s.length;
          this.maxLengthRow = row;
        }
        this.addLevel(known, s, row);
        return;
      }
      if (known !== undefined && known <= -2) {
        const token = this.byteTokens[-2 - known];
        this.tokenCounts.set(token, (this.tokenCounts.get(token) ?? 0) + 1);
        if (this.reader.isErrorToken(token)) note(this.errorCells, row, token);
        this.addMissing();
        return;
      }
      if (known === undefined) {
        const s = decode(b.subarray(start, end));
        const texts = this.textCount,
          missing = this.missingCount;
        this.add(s, row);
        if (this.textCount === texts + 1 && !this.reader.trimmed && this.reader.text === s) {
          this.byteDict.set(b, start, end, this.dict.get(s)!);
        } else if (this.missingCount === missing + 1 && this.reader.token !== '' && !this.reader.trimmed) {
          this.byteTokens.push(this.reader.token);
          this.byteDict.set(b, start, end, -1 - this.byteTokens.length);
        } else {
          this.byteDict.set(b, start, end, -1);
        }
        return;
      }
    }
    this.add(decode(b.subarray(start, end)), row);
  }

  private addLevel(code: number, s: string, row: number): void {
    this.levelCounts[code]++;
    this.textCount++;
    note(this.textCells, row, s);
    this.ensureCodes();
    this.push(NaN, code);
  }

  private push(v: number, code: number): void {
    if (this.n === this.values.length) {
      const grown = new Float64Array(this.values.length * 2);
      grown.set(this.values);
      this.values = grown;
      if (this.codes) {
        const g = new Int32Array(grown.length);
        g.set(this.codes);
        this.codes = g;
      }
    }
    this.values[this.n] = v;
    if (this.codes) this.codes[this.n] = code;
    this.n++;
  }
}
