import type { DateOrder } from './types';

const DAY_MS = 86_400_000;
const ISO = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:[T ](\d{1,2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?Z?)?$/;
const NUMERIC = /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{2}|\d{4})(?: (\d{1,2}):(\d{2})(?::(\d{2}))?)?$/;
const NAMED = /^(\d{1,2})[ -]([A-Za-z]{3,9})\.?[ -](\d{2}|\d{4})$/;
const MONTHS = ['jan', 'feb', 'mar', 'apr', 'may', 'jun', 'jul', 'aug', 'sep', 'oct', 'nov', 'dec'];

function epochDays(y: number, m: number, d: number, hh = 0, mm = 0, ss = 0): number {
  if (m < 1 || m > 12 || d < 1 || d > 31 || hh > 23 || mm > 59 || ss > 59) return NaN;
  const t = Date.UTC(y, m - 1, d, hh, mm, ss);
  const back = new Date(t);
  if (back.getUTCDate() !== d || back.getUTCMonth() !== m - 1) return NaN;
  return t / DAY_MS;
}

/** Two-digit years: 00–29 → 2000s, 30–99 → 1900s (the usual spreadsheet window; common practice). */
function fullYear(y: string): number {
  const v = Number(y);
  return y.length === 4 ? v : v <= 29 ? 2000 + v : 1900 + v;
}

/**
 * Reads a date cell as days since 1970-01-01 UTC (fractional when a time is given); NaN if the text is not
 * a date. Accepts 2021-03-04[ 10:30[:00]], 2021/03/04, 04/03/2021 or 04.03.21 (order from `order`),
 * 4 Mar 2021 and 04-Mar-2021.
 */
export function parseDateText(s: string, order: DateOrder): number {
  let m = ISO.exec(s);
  if (m) return epochDays(+m[1], +m[2], +m[3], +(m[4] ?? 0), +(m[5] ?? 0), +(m[6] ?? 0));
  m = NUMERIC.exec(s);
  if (m) {
    const a = +m[1],
      b = +m[2];
    const [d, mo] = order === 'dmy' ? [a, b] : [b, a];
    return epochDays(fullYear(m[3]), mo, d, +(m[4] ?? 0), +(m[5] ?? 0), +(m[6] ?? 0));
  }
  m = NAMED.exec(s);
  if (m) {
    const mo = MONTHS.indexOf(m[2].slice(0, 3).toLowerCase());
    return mo < 0 ? NaN : epochDays(fullYear(m[3]), mo + 1, +m[1]);
  }
  return NaN;
}

/** 'dmy' or 'mdy' when a numeric date settles the order (a part above 12), else null. */
export function dateOrderEvidence(s: string): DateOrder | null {
  const m = NUMERIC.exec(s);
  if (!m) return null;
  if (+m[1] > 12 && +m[2] <= 12) return 'dmy';
  if (+m[2] > 12 && +m[1] <= 12) return 'mdy';
  return null;
}

/** Formats epoch days as YYYY-MM-DD (UTC). */
export function formatEpochDay(days: number): string {
  return new Date(Math.round(days * DAY_MS)).toISOString().slice(0, 10);
}
