import { FulcraError, sheetRow, type Dataset } from '../core/data';
import { plural } from '../core/wording';
import type { CommonRows, ComparedModel } from './types';

type Numbering = Pick<Dataset, 'firstRow' | 'rowNumbers'>;

const LISTED = 10;

function listRows(rows: number[]): string {
  const shown = rows.slice(0, LISTED).join(', ');
  return rows.length > LISTED ? `${shown} and ${rows.length - LISTED} more` : shown;
}

function checkRowsUsed(m: Pick<ComparedModel, 'label' | 'rowsUsed'>): void {
  const seen = new Set<number>();
  for (const r of m.rowsUsed) {
    if (!(Number.isInteger(r) && r >= 0) || seen.has(r))
      throw new FulcraError(
        'bad-rows-used',
        `${m.label}: its list of rows used must hold distinct dataset indices ≥ 0; ${r} is not one.`,
      );
    seen.add(r);
  }
}

/**
 * The rows two models used and the rows they share (by dataset index; named by spreadsheet row number from
 * `rows`, default numbering: the first data row is row 2). `leaveOut` is what to add to both analysis requests
 * so that a refit of each uses only the common rows.
 */
export function commonRows(
  a: Pick<ComparedModel, 'label' | 'rowsUsed'>,
  b: Pick<ComparedModel, 'label' | 'rowsUsed'>,
  rows: Numbering = {},
): CommonRows {
  checkRowsUsed(a);
  checkRowsUsed(b);
  const inA = new Set(a.rowsUsed);
  const inB = new Set(b.rowsUsed);
  const common = Int32Array.from(a.rowsUsed.filter((r) => inB.has(r))).sort();
  const sheet = (idx: Iterable<number>) => Array.from(idx, (i) => sheetRow(rows, i)).sort((x, y) => x - y);
  const onlyA = sheet(a.rowsUsed.filter((r) => !inB.has(r)));
  const onlyB = sheet(b.rowsUsed.filter((r) => !inA.has(r)));
  return {
    usedByA: a.rowsUsed.length,
    usedByB: b.rowsUsed.length,
    common: common.length,
    dataRows: common,
    onlyA,
    onlyB,
    leaveOut: [...onlyA, ...onlyB].sort((x, y) => x - y),
  };
}

/**
 * Refuses two models fitted on different rows, saying how many rows each used, how many are common, which rows
 * differ, and the fix (refit both on the common rows). Otherwise returns, for each of a's rows in a's order, the
 * position of the same row in b's per-row arrays.
 */
export function alignSameRows(a: ComparedModel, b: ComparedModel, rows: Numbering = {}): Int32Array {
  const c = commonRows(a, b, rows);
  if (c.onlyA.length > 0 || c.onlyB.length > 0) {
    const only = (label: string, list: number[]) =>
      list.length === 0
        ? `no row is used only by ${label}`
        : `${plural(list.length, 'row')} only by ${label} (spreadsheet row${list.length === 1 ? '' : 's'} ` +
          `${listRows(list)})`;
    throw new FulcraError(
      'compare-different-rows',
      `The two models were fitted on different rows, so they cannot be compared case by case: ${a.label} used ` +
        `${plural(c.usedByA, 'row')}, ${b.label} used ${plural(c.usedByB, 'row')}, and ${plural(c.common, 'row')} ` +
        `${c.common === 1 ? 'is' : 'are'} common to both; ${only(a.label, c.onlyA)}, ${only(b.label, c.onlyB)}. ` +
        'Rows usually differ because a predictor of one model has missing values.',
      `Refit both models on the ${plural(c.common, 'common row')} (leave out the ${plural(c.leaveOut.length, 'row')} ` +
        'that only one model used), then compare again.',
    );
  }
  const at = new Map<number, number>();
  b.rowsUsed.forEach((r, k) => at.set(r, k));
  return Int32Array.from(a.rowsUsed, (r) => at.get(r)!);
}
