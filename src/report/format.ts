/**
 * Number formatting shared by the report (and offered to the workbench so screen and PDF agree).
 * Negative numbers use the true minus sign U+2212; missing or non-finite values print as an em dash.
 */
export const MINUS = '\u2212';
export const DASH = '\u2014';

export function formatFixed(x: number | null | undefined, digits: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  const s = Math.abs(x).toFixed(digits);
  const isZero = Number(s) === 0;
  return x < 0 && !isZero ? MINUS + s : s;
}

/** Significant figures without exponent for |x| in [1e-4, 1e6); exponent form ("1.2 × 10^−5") outside. */
export function formatSig(x: number | null | undefined, sig = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  if (x === 0) return '0';
  const ax = Math.abs(x);
  if (ax >= 1e-4 && ax < 1e6) {
    const dp = Math.max(0, sig - 1 - Math.floor(Math.log10(ax)));
    return formatFixed(x, Math.min(dp, 10));
  }
  const [m, e] = x.toExponential(sig - 1).split('e');
  const exp = Number(e);
  return `${m.replace('-', MINUS)} \u00d7 10^${exp < 0 ? MINUS + String(-exp) : String(exp)}`;
}

/** p-values: "< 0.001" below 0.001, else three decimals. */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return DASH;
  return p < 0.001 ? '< 0.001' : p.toFixed(3);
}

/** An interval written "lower to upper" (avoids confusing a dash with a minus sign). */
export function formatInterval(
  lower: number | null | undefined,
  upper: number | null | undefined,
  digits: number,
): string {
  if (lower === null || lower === undefined || upper === null || upper === undefined) return DASH;
  if (!Number.isFinite(lower) && !Number.isFinite(upper)) return DASH;
  return `${formatFixed(lower, digits)} to ${formatFixed(upper, digits)}`;
}

/** Proportion as a percentage, e.g. 0.1234 → "12.3%". */
export function formatPercent(x: number | null | undefined, digits = 1): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  return `${formatFixed(100 * x, digits)}%`;
}

/** Integer with comma grouping ("12,345"). */
export function formatCount(n: number | null | undefined): string {
  if (n === null || n === undefined || !Number.isFinite(n)) return DASH;
  const s = Math.round(Math.abs(n))
    .toString()
    .replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return n < 0 ? MINUS + s : s;
}

/** Up to `sig` significant figures with trailing zeros removed (costs, λ, knots): 5 → "5", 0.12500 → "0.125". */
export function formatPlain(x: number | null | undefined, sig = 4): string {
  const s = formatSig(x, sig);
  return s.includes('.') && !s.includes('\u00d7') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}

/** A confidence level as a percentage without trailing zeros: 0.95 → "95%". */
export function levelText(level: number): string {
  return `${formatPlain(100 * level, 3)}%`;
}

/** Odds ratios: 2 decimals, more when β is near 0 (so exp(β) ≠ 1.00 shows), significant figures when tiny or huge. */
export function formatOr(x: number, beta = Math.log(x)): string {
  if (!Number.isFinite(x)) return x > 0 ? '\u221e' : DASH;
  if (x >= 100 || x < 0.01) return formatSig(x, 3);
  const ab = Math.abs(beta);
  const digits = ab > 0 && ab < 0.005 ? Math.min(6, Math.ceil(-Math.log10(ab)) + 1) : 3;
  return formatFixed(x, digits);
}
