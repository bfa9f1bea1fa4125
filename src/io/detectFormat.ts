import { parseNumberText } from './cellText';
import { CsvTokenizer, recordStrings } from './csvTokenizer';
import type { DecimalMark, Delimiter } from './types';

const CANDIDATES: readonly Delimiter[] = ['\t', ';', '|', ','];
const MAX_RECORDS = 200;

function sampleRecords(sample: string, delimiter: Delimiter, complete: boolean): string[][] {
  const out: string[][] = [];
  const t = new CsvTokenizer(delimiter, (r) => {
    if (out.length >= MAX_RECORDS) return;
    const f = recordStrings(r);
    if (!(f.length === 1 && f[0].trim() === '')) out.push(f);
  });
  t.feed(sample, complete);
  return out;
}

function modeCount(records: string[][]): { mode: number; share: number } {
  const freq = new Map<number, number>();
  for (const r of records) freq.set(r.length, (freq.get(r.length) ?? 0) + 1);
  let mode = 0,
    best = 0;
  for (const [k, c] of freq) if (c > best || (c === best && k > mode)) [mode, best] = [k, c];
  return { mode, share: records.length ? best / records.length : 0 };
}

/**
 * Picks the delimiter whose records most consistently split into ≥ 2 fields (share of records with the most
 * common field count ≥ 0.9); among consistent ones tab, semicolon and pipe are preferred over comma, since
 * commas also occur inside decimal-comma numbers. null when no candidate splits the text.
 */
export function detectDelimiter(sample: string, complete: boolean): Delimiter | null {
  let fallback: { d: Delimiter; score: number } | null = null;
  for (const d of CANDIDATES) {
    const { mode, share } = modeCount(sampleRecords(sample, d, complete));
    if (mode < 2) continue;
    if (share >= 0.9) return d;
    if (!fallback || share > fallback.score) fallback = { d, score: share };
  }
  return fallback?.d ?? null;
}

const COMMA_DECIMAL = /^[+-]?\d*,\d+$/;
const DOT_DECIMAL = /^[+-]?\d*\.\d+$/;
const DOT_THOUSANDS_COMMA_DECIMAL = /^[+-]?\d{1,3}(\.\d{3})+,\d+$/;
const AMBIGUOUS = /^[+-]?\d{1,3}[.,]\d{3}$/;

/** Decimal comma when more sample cells look like "1,5" than like "1.5" (cells like "1,234" settle nothing). */
export function detectDecimal(sample: string, delimiter: Delimiter, complete: boolean): DecimalMark {
  let comma = 0,
    dot = 0;
  for (const r of sampleRecords(sample, delimiter, complete)) {
    for (const raw of r) {
      const f = raw.trim();
      if (AMBIGUOUS.test(f)) continue;
      if (COMMA_DECIMAL.test(f) || DOT_THOUSANDS_COMMA_DECIMAL.test(f)) comma++;
      else if (DOT_DECIMAL.test(f)) dot++;
    }
  }
  return comma > dot ? ',' : '.';
}

/** A first row is a header unless most of its non-empty cells are numbers. */
export function detectHeader(sample: string, delimiter: Delimiter, decimal: DecimalMark, complete: boolean): boolean {
  const first = sampleRecords(sample, delimiter, complete)[0];
  if (!first) return true;
  const cells = first.map((c) => c.trim()).filter((c) => c !== '');
  const numbers = cells.filter((c) => !Number.isNaN(parseNumberText(c, decimal === ','))).length;
  return !(cells.length > 0 && numbers > cells.length / 2);
}
