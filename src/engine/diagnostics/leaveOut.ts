import { FulcraError, sheetRow, type Dataset } from '../core/data';

/**
 * A copy of `data` without the rows whose spreadsheet row numbers are listed (the "what if these rows were left
 * out?" refit). `data` itself is not changed; the copy keeps every remaining row's spreadsheet number, so messages
 * and diagnostics of the refit name the same rows. A number that is not a row of the data is refused by name.
 */
export function leaveRowsOut(data: Dataset, sheetRows: readonly number[]): Dataset {
  if (sheetRows.length === 0) return data;
  const wanted = new Set(sheetRows);
  const keep: number[] = [];
  const found = new Set<number>();
  for (let i = 0; i < data.nRows; i++) {
    const r = sheetRow(data, i);
    if (wanted.has(r)) found.add(r);
    else keep.push(i);
  }
  const missing = sheetRows.filter((r) => !found.has(r));
  if (missing.length > 0) {
    const first = sheetRow(data, 0);
    const last = sheetRow(data, data.nRows - 1);
    throw new FulcraError(
      'bad-request',
      `Row${missing.length === 1 ? '' : 's'} ${missing.join(', ')} to leave out ` +
        `${missing.length === 1 ? 'is' : 'are'} ` +
        `not a data row (the data hold spreadsheet rows ${first} to ${last}).`,
      'Give spreadsheet row numbers as the data grid shows them.',
    );
  }
  const idx = Int32Array.from(keep);
  return {
    nRows: idx.length,
    columns: data.columns.map((c) =>
      c.kind === 'numeric'
        ? { kind: 'numeric', name: c.name, values: Float64Array.from(idx, (i) => c.values[i]) }
        : { kind: 'categorical', name: c.name, levels: c.levels, codes: Int32Array.from(idx, (i) => c.codes[i]) },
    ),
    rowNumbers: Int32Array.from(idx, (i) => sheetRow(data, i)),
  };
}
