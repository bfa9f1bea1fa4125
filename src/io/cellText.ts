/** Cell texts read as missing by default (compared after trimming, case-insensitively). */
export const DEFAULT_MISSING_TOKENS: readonly string[] = [
  '',
  'NA',
  'N/A',
  '.',
  '-',
  '?',
  '#N/A',
  '#DIV/0!',
  '#VALUE!',
  '#REF!',
  '#NAME?',
  '#NUM!',
  '#NULL!',
];

/** Spreadsheet error values (a formula that failed); read as missing and reported. */
export const SPREADSHEET_ERRORS: ReadonlySet<string> = new Set([
  '#N/A',
  '#DIV/0!',
  '#VALUE!',
  '#REF!',
  '#NAME?',
  '#NUM!',
  '#NULL!',
  '#SPILL!',
  '#CALC!',
  '#GETTING_DATA',
]);

export function missingSet(tokens: readonly string[]): Set<string> {
  return new Set(tokens.map((t) => t.trim().toUpperCase()));
}

/** Result flags of `parseNumberText`, reused to avoid allocation per cell. */
export const numberFlags = { thousands: false };

const D0 = 48,
  D9 = 57,
  DOT = 46,
  COMMA = 44,
  PLUS = 43,
  MINUS = 45,
  LE = 101,
  UE = 69;
const THOUSANDS_DOT = /^[+-]?\d{1,3}(,\d{3})+(\.\d*)?$/;
const THOUSANDS_COMMA = /^[+-]?\d{1,3}([. \u00a0\u202f]\d{3})+(,\d*)?$/;

/**
 * Reads a trimmed cell as a plain decimal number ("1.5", "-2e3", "1,234.5"; with decimal comma "1,5",
 * "1.234,5", "1 234,5"). Returns NaN for anything else (text, hex, "Infinity", units).
 * Sets `numberFlags.thousands` when a thousands separator was removed.
 */
export function parseNumberText(s: string, decimalComma: boolean): number {
  numberFlags.thousands = false;
  const n = s.length;
  if (n === 0) return NaN;
  // Fast path: Number() on text that starts and ends like a plain decimal and is not hex/binary/octal.
  const first = s.charCodeAt(0),
    last = s.charCodeAt(n - 1);
  if (
    ((first >= D0 && first <= D9) || first === MINUS || first === PLUS || first === DOT) &&
    ((last >= D0 && last <= D9) || last === DOT)
  ) {
    const second = n > 1 ? s.charCodeAt(1) | 32 : 0;
    if (second !== 120 && second !== 98 && second !== 111 && (!decimalComma || s.indexOf('.') < 0)) {
      const v = Number(s);
      if (v === v) return v;
    }
  }
  let digits = 0,
    commas = 0,
    other = 0;
  for (let i = 0; i < n; i++) {
    const c = s.charCodeAt(i);
    if (c >= D0 && c <= D9) digits++;
    else if (c === COMMA) commas++;
    else if (c !== DOT && c !== PLUS && c !== MINUS && c !== LE && c !== UE) other++;
  }
  if (digits === 0) return NaN;
  if (!decimalComma) {
    if (other > 0) return NaN;
    if (commas === 0) return Number(s);
    if (!THOUSANDS_DOT.test(s)) return NaN;
    numberFlags.thousands = true;
    return Number(s.replace(/,/g, ''));
  }
  if (other === 0 && s.indexOf('.') < 0)
    return commas === 0 ? Number(s) : commas === 1 ? Number(s.replace(',', '.')) : NaN;
  if (!THOUSANDS_COMMA.test(s)) return NaN;
  numberFlags.thousands = true;
  return Number(s.replace(/[. \u00a0\u202f]/g, '').replace(',', '.'));
}

const UNIT_RE = /^([$€£¥])?\s*([+-]?\d[\d.,\u00a0 ]*(?:[eE][+-]?\d+)?)\s*([A-Za-zµμ%‰°][A-Za-z0-9µμ%‰°/²³.·-]*)?$/;

/** Splits "12 mg", "37.5°C", "45%", "$12" into number and unit; null when the cell is not of that form. */
export function splitUnit(s: string, decimalComma: boolean): { value: number; unit: string } | null {
  const m = UNIT_RE.exec(s);
  if (!m || (!m[1] && !m[3])) return null;
  const value = parseNumberText(m[2].trim(), decimalComma);
  if (Number.isNaN(value)) return null;
  return { value, unit: (m[1] ?? '') + (m[1] && m[3] ? ' ' : '') + (m[3] ?? '') };
}

/** True for "007", "0123" — numbers whose leading zero would be lost (codes, postcodes, record numbers). */
export function hasLeadingZero(s: string): boolean {
  return s.length > 1 && s.charCodeAt(0) === D0 && s.charCodeAt(1) >= D0 && s.charCodeAt(1) <= D9;
}

const POW10 = [
  1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20,
  1e21, 1e22,
];
const MAX_EXACT = 2 ** 53;

/**
 * Reads text[i, end) as a plain decimal ("-12.5", "3e4"; decimal mark `dec`) without creating a string.
 * Exact by Clinger's fast path (an integer mantissa ≤ 2^53 times or divided by 10^k, k ≤ 22, is one
 * correctly rounded operation; Clinger 1990, "How to read floating point numbers accurately").
 * Returns NaN when the span is anything else (the caller then uses `parseNumberText`).
 */
export function parseSpanNumber(t: string, i: number, end: number, dec: number): number {
  let neg = false;
  let c = t.charCodeAt(i);
  if (c === MINUS) {
    neg = true;
    i++;
  } else if (c === PLUS) i++;
  let m = 0,
    digits = 0,
    frac = 0,
    dot = false;
  for (; i < end; i++) {
    c = t.charCodeAt(i);
    if (c >= D0 && c <= D9) {
      m = m * 10 + (c - D0);
      digits++;
      if (dot) frac++;
    } else if (c === dec && !dot) dot = true;
    else break;
  }
  if (digits === 0 || m > MAX_EXACT) return NaN;
  let e = 0;
  if (i < end && (c === LE || c === UE)) {
    i++;
    let eneg = false;
    c = t.charCodeAt(i);
    if (c === MINUS || c === PLUS) {
      eneg = c === MINUS;
      i++;
    }
    let ed = 0;
    for (; i < end; i++) {
      c = t.charCodeAt(i);
      if (c < D0 || c > D9 || ed > 3) break;
      e = e * 10 + (c - D0);
      ed++;
    }
    if (ed === 0) return NaN;
    if (eneg) e = -e;
  }
  if (i !== end) return NaN;
  const k = e - frac;
  let v: number;
  if (k === 0) v = m;
  else if (k > 0 && k <= 22) v = m * POW10[k];
  else if (k < 0 && k >= -22) v = m / POW10[-k];
  else return NaN;
  return neg ? -v : v;
}

/** `parseSpanNumber` over bytes of an ASCII-compatible encoding. */
export function parseByteNumber(t: Uint8Array, i: number, end: number, dec: number): number {
  let neg = false;
  let c = t[i];
  if (c === MINUS) {
    neg = true;
    i++;
  } else if (c === PLUS) i++;
  let m = 0,
    digits = 0,
    frac = 0,
    dot = false;
  for (; i < end; i++) {
    c = t[i];
    if (c >= D0 && c <= D9) {
      m = m * 10 + (c - D0);
      digits++;
      if (dot) frac++;
    } else if (c === dec && !dot) dot = true;
    else break;
  }
  if (digits === 0 || m > MAX_EXACT) return NaN;
  let e = 0;
  if (i < end && (c === LE || c === UE)) {
    i++;
    let eneg = false;
    c = t[i];
    if (c === MINUS || c === PLUS) {
      eneg = c === MINUS;
      i++;
    }
    let ed = 0;
    for (; i < end; i++) {
      c = t[i];
      if (c < D0 || c > D9 || ed > 3) break;
      e = e * 10 + (c - D0);
      ed++;
    }
    if (ed === 0) return NaN;
    if (eneg) e = -e;
  }
  if (i !== end) return NaN;
  const k = e - frac;
  let v: number;
  if (k === 0) v = m;
  else if (k > 0 && k <= 22) v = m * POW10[k];
  else if (k < 0 && k >= -22) v = m / POW10[-k];
  else return NaN;
  return neg ? -v : v;
}
