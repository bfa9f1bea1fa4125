import { hasLeadingZero, missingSet, numberFlags, parseNumberText, SPREADSHEET_ERRORS } from './cellText';

export const CELL_MISSING = 0,
  CELL_NUMBER = 1,
  CELL_TEXT = 2;

/**
 * Classifies one cell as missing, number or text under the import's decimal mark and missing tokens.
 * After `read`, `text` holds the trimmed cell, `value` the number, and the flags describe the cell.
 */
export class CellReader {
  text = '';
  value = NaN;
  trimmed = false;
  thousands = false;
  leadingZero = false;
  /** The missing token matched, upper-cased ('' for an empty cell). */
  token = '';
  isError = false;
  private readonly tokens: Set<string>;
  private readonly numericTokens: Set<number>;
  private readonly maxTokenLength: number;
  /** True when a missing token is a number (e.g. -99), so number cells must be checked against the list. */
  readonly hasNumericTokens: boolean;
  /** First characters (both cases) of the missing tokens, to skip the lookup for most text cells. */
  private readonly tokenStarts = new Set<number>();

  constructor(
    readonly decimalComma: boolean,
    missingTokens: readonly string[],
  ) {
    this.tokens = missingSet(missingTokens);
    this.numericTokens = new Set();
    let max = 0;
    for (const t of this.tokens) {
      max = Math.max(max, t.length);
      if (t.length > 0) {
        this.tokenStarts.add(t.charCodeAt(0));
        this.tokenStarts.add(t.toLowerCase().charCodeAt(0));
      }
      const v = parseNumberText(t, decimalComma);
      if (!Number.isNaN(v)) this.numericTokens.add(v);
    }
    this.maxTokenLength = max;
    this.hasNumericTokens = this.numericTokens.size > 0;
  }

  read(raw: string): number {
    let s = raw;
    const n = s.length;
    this.trimmed = false;
    if (n > 0) {
      const a = s.charCodeAt(0),
        b = s.charCodeAt(n - 1);
      if (a <= 32 || b <= 32 || a === 160 || b === 160) {
        s = s.trim();
        this.trimmed = s.length > 0;
      }
    }
    this.text = s;
    if (s.length === 0) {
      this.token = '';
      this.isError = false;
      return CELL_MISSING;
    }
    const v = parseNumberText(s, this.decimalComma);
    if (!Number.isNaN(v)) {
      if (this.numericTokens.size > 0 && this.numericTokens.has(v)) return this.missing(s);
      this.value = v;
      this.thousands = numberFlags.thousands;
      this.leadingZero = hasLeadingZero(s);
      return CELL_NUMBER;
    }
    if (s.length <= this.maxTokenLength && this.tokenStarts.has(s.charCodeAt(0))) {
      const up = s.toUpperCase();
      if (this.tokens.has(up)) return this.missing(up);
    }
    return CELL_TEXT;
  }

  isErrorToken(upper: string): boolean {
    return SPREADSHEET_ERRORS.has(upper);
  }

  private missing(up: string): number {
    this.token = up.toUpperCase();
    this.isError = SPREADSHEET_ERRORS.has(this.token);
    return CELL_MISSING;
  }
}
