import { FulcraError, type Column } from '../engine/core';
import type { Dataset, EngineWarning } from '../engine/core';
import { buildColumn, planColumns, rowWarnings } from './finish';
import type { ResolvedOptions } from './options';
import type { TableBuilder } from './tableBuilder';
import type { ColumnInfo, ImportFormat, ImportHooks, ImportResult } from './types';

export function checkCancelled(hooks: ImportHooks): void {
  if (hooks.signal?.aborted)
    throw new FulcraError('cancelled', 'The import was cancelled.', 'Open the file again when ready.');
}

/** Runs after every chunk: progress, a chance for the worker to yield, then the cancel check. */
export async function afterChunk(hooks: ImportHooks, fraction: number, rows: number): Promise<void> {
  hooks.onProgress?.(fraction, rows);
  if (hooks.tick) await hooks.tick();
  checkCancelled(hooks);
}

/**
 * Turns a fully read table into the import result: types, the optional second pass for exact text
 * (`replay` feeds the same records again), engine columns, profiles and messages.
 */
export async function finishImport(
  tb: TableBuilder,
  o: ResolvedOptions,
  format: ImportFormat,
  warnings: EngineWarning[],
  replay: () => Promise<void>,
  fileName: string,
): Promise<ImportResult> {
  if (tb.cols.length === 0) {
    throw new FulcraError(
      'empty-file',
      `"${fileName}" holds no cells` +
        `${tb.records > 0 ? ` (${tb.records} blank row${tb.records === 1 ? '' : 's'})` : ''}.`,
      'Check that the right file was chosen, and export it again from the spreadsheet if needed.',
    );
  }
  if (tb.nRows === 0) {
    throw new FulcraError(
      'no-data-rows',
      `"${fileName}" has a header row (row ${tb.headerRow}: ${tb.namer.names
        .slice(0, 5)
        .map((n) => `"${n}"`)
        .join(', ')}${tb.cols.length > 5 ? ', …' : ''}) but no data rows.`,
      format.header
        ? 'Check the file, or turn off "first row holds column names" if that row is data.'
        : 'Check that the right file was chosen.',
    );
  }
  for (const [name, what] of [
    ...Object.keys(o.columnTypes).map((n) => [n, 'A type was chosen'] as const),
    ...o.stripUnits.map((n) => [n, 'Unit stripping was asked'] as const),
  ]) {
    if (!tb.namer.names.includes(name)) {
      throw new FulcraError(
        'unknown-column',
        `${what} for column "${name}", which is not in the file. Columns are: ${tb.namer.names.join(', ')}.`,
        'Check the spelling of the column name.',
      );
    }
  }
  format.headerRow = tb.headerRow;
  const plans = planColumns(tb, o);
  const textCols = plans.filter((p) => p.needsText).map((p) => p.index);
  let text = new Map<number, import('./tableBuilder').TextPassColumn>();
  if (textCols.length > 0) {
    tb.beginTextPass(textCols);
    await replay();
    text = tb.endTextPass();
  }
  const sourceRows = tb.rowNumbers();
  const columns: Column[] = [];
  const infos: ColumnInfo[] = [];
  const all = [...tb.namer.warnings, ...warnings, ...rowWarnings(tb)];
  for (const p of plans) {
    const { column, info } = buildColumn(p, tb.cols[p.index], text.get(p.index), sourceRows);
    columns.push(column);
    infos.push(info);
    all.push(...info.issues);
  }
  // The spreadsheet row of data row 0 (header = row 1), so that engine messages name rows as the importer does;
  // after a skipped blank row the rows are no longer consecutive, and the dataset keeps every row's number.
  const dataset: Dataset = { nRows: tb.nRows, columns, firstRow: sourceRows[0] };
  const consecutive = tb.nRows === 0 || sourceRows[tb.nRows - 1] - sourceRows[0] === tb.nRows - 1;
  if (!consecutive) dataset.rowNumbers = sourceRows.slice();
  return { dataset, columns: infos, warnings: all, format, sourceRows };
}
