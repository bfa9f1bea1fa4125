import { warning } from '../engine/core';
import { importDelimited, PASTED_TEXT } from './importDelimited';
import { importXlsx } from './importXlsx';
import { resolveImportOptions } from './options';
import type { ImportHooks, ImportOptions, ImportResult } from './types';
import { looksLikeOle, looksLikeZip } from './zip';

/**
 * Imports a spreadsheet file in the worker or in Node: .xlsx through Fulcra's own flat sheet reader, anything else as
 * delimited text (delimiter, decimal mark, encoding and header row detected unless given in `options`).
 * Reads in chunks; after each chunk calls `onProgress(fraction, rowsSoFar)`, awaits `tick()`, then throws
 * FulcraError('cancelled') if `signal.aborted`. The 4th argument may be the hooks object or `onProgress`.
 * Fatal problems throw FulcraError naming the row/column and what to do; others become warnings.
 * Row numbers follow the spreadsheet: header = row 1, first data row = row 2.
 */
export async function importFile(
  bytes: ArrayBuffer | Uint8Array,
  fileName: string,
  options: ImportOptions = {},
  hooks: ImportHooks | ImportHooks['onProgress'] = {},
  signal?: { aborted: boolean },
): Promise<ImportResult> {
  const h: ImportHooks =
    typeof hooks === 'function' ? { onProgress: hooks, signal } : { ...hooks, signal: hooks.signal ?? signal };
  const o = resolveImportOptions(options);
  // A plain view (not a Node Buffer, whose slice() shares memory).
  const b =
    bytes instanceof Uint8Array
      ? new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength)
      : new Uint8Array(bytes);
  const byName = /\.xlsx$|\.xlsm$/i.test(fileName);
  if (o.format === 'xlsx' || (o.format === 'auto' && (byName || looksLikeOle(b)))) return importXlsx(b, fileName, o, h);
  if (o.format === 'auto' && looksLikeZip(b)) {
    const r = await importXlsx(b, fileName, o, h);
    r.warnings.unshift(
      warning(
        'workbook-content',
        `"${fileName}" is named like a text file but is an Excel workbook; it was read as one.`,
        'Nothing to do; rename the file to .xlsx to avoid confusion.',
      ),
    );
    return r;
  }
  return importDelimited(b, fileName, o, h);
}

/**
 * The ArrayBuffers of an import result's columns and row numbers, for a worker to transfer rather than copy
 * (each column owns its buffer).
 */
export function importTransferables(r: ImportResult): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>([r.sourceRows.buffer as ArrayBuffer]);
  for (const c of r.dataset.columns) out.add((c.kind === 'numeric' ? c.values.buffer : c.codes.buffer) as ArrayBuffer);
  return [...out];
}

/**
 * Imports text pasted from a spreadsheet (tab-separated) or any delimited text, with the same detection,
 * typing and messages as `importFile`.
 */
export function importText(text: string, options: ImportOptions = {}, hooks: ImportHooks = {}): Promise<ImportResult> {
  const o = resolveImportOptions({ ...options, format: 'delimited', encoding: 'utf-8' });
  return importDelimited(new TextEncoder().encode(text), PASTED_TEXT, o, hooks);
}
