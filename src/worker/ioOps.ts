import { importFile, importText } from '../io';
import type { ImportHooks, ImportOptions, ImportResult } from '../io/types';

/** Reads a file's bytes with the importer (delimited text or a workbook, detected). */
export function readBytes(
  bytes: ArrayBuffer,
  fileName: string,
  options: ImportOptions,
  hooks: ImportHooks,
): Promise<ImportResult> {
  return importFile(bytes, fileName, options, hooks);
}

/** Reads pasted spreadsheet cells (tab-separated, first row = names). */
export function readPasted(text: string, options: ImportOptions, hooks: ImportHooks): Promise<ImportResult> {
  return importText(text, options, hooks);
}
