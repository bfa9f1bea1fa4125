/** Number formatting shared by the headless command's readable output. */
export function fmt(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const a = Math.abs(x);
  if (a !== 0 && (a < 1e-4 || a >= 1e6)) return x.toExponential(digits - 1);
  return x.toFixed(digits);
}

export function fmtP(p: number | null | undefined): string {
  if (p === null || p === undefined || Number.isNaN(p)) return '—';
  if (p < 0.0001) return '<0.0001';
  return p.toFixed(4);
}

export function pct(x: number | null | undefined, digits = 1): string {
  return x === null || x === undefined || Number.isNaN(x) ? '—' : `${(100 * x).toFixed(digits)}%`;
}

/** Left-aligned first column, right-aligned others. */
export function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => (r[j] ?? '').length)));
  const line = (r: string[]) => r.map((c, j) => (j === 0 ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ');
  return [line(header), widths.map((w) => '─'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}
