import { FulcraError, getColumn, sheetRow, type Dataset } from '../core/data';
import type { ModelSpec } from '../core/model';

/** 2^52: beyond this ratio to the largest value, a number is below the last bit of it (IEEE 754 double). */
const LOST = 2 ** 52;

function numericColumnsOf(data: Dataset, spec: ModelSpec): string[] {
  const names = new Set<string>();
  for (const t of spec.terms) for (const c of t.type === 'interaction' ? t.columns : [t.column]) names.add(c);
  return [...names].filter((n) => getColumn(data, n).kind === 'numeric');
}

const list = (parts: string[]) =>
  parts.length === 1 ? parts[0] : `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}`;

/**
 * Refuses a numeric predictor whose largest values are so far beyond its others (a ratio above 2^52 to the median
 * size of its non-zero values) that, once the column is scaled to them, every other value is below the last bit of
 * double precision: the fit could only treat those few rows as a category of their own (e.g. ±1e308 typed among
 * values of tens). Names the column, the rows (spreadsheet numbers) and their values. One pass per column; the sort
 * for the message runs only when a column fails.
 */
export function checkExtremeValues(data: Dataset, spec: ModelSpec, rowsUsed: Int32Array): void {
  for (const name of numericColumnsOf(data, spec)) {
    const col = getColumn(data, name);
    if (col.kind !== 'numeric') continue;
    const v = col.values;
    // One pass for the largest size and the smallest non-zero one: the count pass runs only when that smallest
    // size is below the last bit of the largest (NaN compares false and is skipped, as Math.max would not).
    let M = 0,
      least = Infinity,
      nan = false;
    for (let i = 0; i < rowsUsed.length; i++) {
      const a = Math.abs(v[rowsUsed[i]]);
      if (a > M) M = a;
      if (a > 0 && a < least) least = a;
      if (a !== a) nan = true;
    }
    if (nan || !(M > 0) || !Number.isFinite(M)) continue;
    const floor = M / LOST;
    if (least > floor) continue;
    let nonZero = 0,
      lost = 0;
    for (let i = 0; i < rowsUsed.length; i++) {
      const a = Math.abs(v[rowsUsed[i]]);
      if (a === 0) continue;
      nonZero++;
      if (a <= floor) lost++;
    }
    if (lost * 2 < nonZero) continue;
    const sizes = Float64Array.from(rowsUsed, (r) => Math.abs(v[r]))
      .filter((a) => a > 0)
      .sort();
    const median = sizes[Math.floor((sizes.length - 1) / 2)];
    const far: number[] = [];
    for (const r of rowsUsed) if (Math.abs(v[r]) > median * LOST) far.push(r);
    const shown = far.slice(0, 5).map((r) => `${v[r]} in row ${sheetRow(data, r)}`);
    if (far.length > 5) shown.push(`${far.length - 5} more`);
    throw new FulcraError(
      'extreme-values',
      `"${name}" has values so far beyond its others that double precision cannot fit them together: ` +
        `${list(shown)}, while half of its values are at most ${+median.toPrecision(4)} in size. Next to them ` +
        `every other value of "${name}" is lost (a ratio beyond 2^52, about 4.5e15), so no coefficient for ` +
        `"${name}" can be estimated.`,
      'Check those cells: a typing error, a code for a missing value, or other units? Correct them or leave them ' +
        'empty (missing), then fit again.',
    );
  }
}
