/** Reading category levels: plain decimals, and the absence level of a two-level absence/presence column. */

/** Absence/presence pairs, lower case, absence first; 0/1 is matched by value ("0", "1.0", …). */
const PAIRS: readonly [string, string][] = [
  ['false', 'true'],
  ['no', 'yes'],
  ['n', 'y'],
  ['absent', 'present'],
  ['negative', 'positive'],
  ['neg', 'pos'],
  ['off', 'on'],
];

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** A plain decimal number written as text ("1.5", "-2e3"); NaN for anything else (blank, hex, "Infinity"). */
export function parseDecimal(text: string): number {
  const t = text.trim();
  if (!DECIMAL.test(t)) return NaN;
  const v = Number(t);
  return Number.isFinite(v) ? v : NaN;
}

/**
 * The absence level of a two-level column whose levels are 0/1, FALSE/TRUE, no/yes, N/Y, absent/present,
 * negative/positive, neg/pos or off/on (any case, surrounding spaces ignored), as written in `levels`; null for
 * any other set of levels. It is the default reference level, so that the coefficient is that of the presence
 * level, as glm gives it on the 0/1 coding.
 */
export function absenceLevel(levels: readonly string[]): string | null {
  if (levels.length !== 2) return null;
  const t = levels.map((l) => l.trim());
  const v = t.map(parseDecimal);
  if (v[0] === 0 && v[1] === 1) return levels[0];
  if (v[0] === 1 && v[1] === 0) return levels[1];
  const low = t.map((l) => l.toLowerCase());
  for (const [absent, present] of PAIRS) {
    if (low[0] === absent && low[1] === present) return levels[0];
    if (low[0] === present && low[1] === absent) return levels[1];
  }
  return null;
}
