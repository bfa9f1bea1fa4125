import { readSheet } from 'read-excel-file/universal';
import { FulcraError } from '../engine/core';
import { warning, type EngineWarning } from '../engine/core';
import { CellReader } from './cellReader';
import { afterChunk, checkCancelled, finishImport } from './finishImport';
import type { ResolvedOptions } from './options';
import { plural } from './rows';
import { TableBuilder, type Cell } from './tableBuilder';
import type { ImportFormat, ImportHooks, ImportResult } from './types';
import { scanSheet, workbookSheets } from './xlsxScan';
import { listZip, looksLikeOle, looksLikeZip, readZipText } from './zip';

const ROWS_PER_CHUNK = 20_000;

function notAWorkbook(bytes: Uint8Array, fileName: string): FulcraError {
  const head = new TextDecoder('utf-8').decode(bytes.subarray(0, 200));
  // eslint-disable-next-line no-control-regex -- control characters (not tab or line breaks) or U+FFFD mean binary
  const isText = !/[\u0000-\u0008\u000e-\u001f\ufffd]/.test(head);
  const shown = head.slice(0, 40).replace(/\s+/g, ' ');
  return new FulcraError(
    'not-xlsx',
    `"${fileName}" is named like an Excel workbook but is not one` +
      `${isText ? `: it is plain text starting "${shown}"` : ''}.`,
    isText
      ? 'If it is comma- or tab-separated text, rename it to .csv (or choose "delimited text") and open it again.'
      : 'Open it in the program that made it and save it as .xlsx or CSV.',
  );
}

/** Sheet names of an .xlsx workbook, in workbook order. */
export async function listSheets(bytes: Uint8Array, fileName = 'workbook.xlsx'): Promise<string[]> {
  return (await workbookParts(bytes, fileName)).sheets.map((s) => s.name);
}

async function workbookParts(bytes: Uint8Array, fileName: string) {
  if (bytes.length === 0)
    throw new FulcraError(
      'empty-file',
      `"${fileName}" is empty (0 bytes).`,
      'Save the workbook again from the spreadsheet and open the new file.',
    );
  if (looksLikeOle(bytes)) {
    throw new FulcraError(
      'xls-not-supported',
      `"${fileName}" is an old-style Excel file (.xls) or another Office binary file, which is not read.`,
      'Open it in the spreadsheet and save it as .xlsx or CSV UTF-8.',
    );
  }
  if (!looksLikeZip(bytes)) throw notAWorkbook(bytes, fileName);
  const entries = listZip(bytes);
  const wb = await readZipText(bytes, entries, 'xl/workbook.xml');
  if (wb === null)
    throw new FulcraError(
      'not-xlsx',
      `"${fileName}" is a zip archive but not an Excel workbook (it has no xl/workbook.xml).`,
      'Open it in the program that made it and save it as .xlsx.',
    );
  const rels = (await readZipText(bytes, entries, 'xl/_rels/workbook.xml.rels')) ?? '';
  return { entries, sheets: workbookSheets(wb, rels) };
}

/** Imports one sheet of an .xlsx workbook (values as last saved; formulas are not recalculated). */
export async function importXlsx(
  bytes: Uint8Array,
  fileName: string,
  o: ResolvedOptions,
  hooks: ImportHooks,
): Promise<ImportResult> {
  checkCancelled(hooks);
  const { entries, sheets } = await workbookParts(bytes, fileName);
  if (sheets.length === 0) throw new FulcraError('no-sheets', `The workbook "${fileName}" has no sheets.`);
  const names = sheets.map((s) => s.name);
  const chosen =
    o.sheet === undefined
      ? sheets[0]
      : typeof o.sheet === 'number'
        ? sheets[o.sheet]
        : sheets.find((s) => s.name === o.sheet);
  if (!chosen) {
    throw new FulcraError(
      'unknown-sheet',
      `The workbook has no sheet ${typeof o.sheet === 'number' ? `number ${o.sheet + 1}` : `"${o.sheet}"`}. ` +
        `Sheets are: ${names.map((n) => `"${n}"`).join(', ')}.`,
      'Choose one of the listed sheets.',
    );
  }
  let rows: Cell[][];
  try {
    rows = (await readSheet(Uint8Array.prototype.slice.call(bytes).buffer, chosen.name)) as Cell[][];
  } catch (e) {
    throw new FulcraError(
      'bad-xlsx',
      `The sheet "${chosen.name}" of "${fileName}" could not be read: ${(e as Error).message}.`,
      'Open the workbook in the spreadsheet, save it again as .xlsx, and retry.',
    );
  }
  await afterChunk(hooks, 0.3, 0);
  const warnings: EngineWarning[] = [];
  const xml = chosen.path ? await readZipText(bytes, entries, chosen.path) : null;
  if (xml) {
    const scan = scanSheet(xml);
    for (const err of scan.errors) {
      const r = rows[err.row - 1];
      if (r && (r[err.col] === null || r[err.col] === undefined)) r[err.col] = err.value;
    }
    if (scan.formulas > 0) {
      warnings.push(
        warning(
          'formulas',
          `${plural(scan.formulas, 'cell holds a formula', 'cells hold formulas')}; ` +
            'the results last saved by the spreadsheet are used, not recalculated.',
          'If the results may be out of date, open the workbook in the spreadsheet, let it recalculate, and save it.',
        ),
      );
    }
    if (scan.formulasWithoutValue.length > 0) {
      warnings.push(
        warning(
          'formula-no-value',
          `${plural(scan.formulasWithoutValue.length, 'formula cell has', 'formula cells have')} no saved result ` +
            `(${scan.formulasWithoutValue.slice(0, 5).join(', ')}); read as missing.`,
          'Open the workbook in the spreadsheet, let it recalculate, and save it.',
        ),
      );
    }
  }
  const header = o.header === 'auto' ? xlsxHeader(rows[0]) : o.header;
  const tb = new TableBuilder(new CellReader(o.decimal === ',', o.missingTokens), header, new Set(o.stripUnits));
  const feed = async (from: number, span: number) => {
    for (let i = 0; i < rows.length; i++) {
      tb.addRecord(rows[i], rows[i].length);
      if ((i + 1) % ROWS_PER_CHUNK === 0) await afterChunk(hooks, from + (span * (i + 1)) / rows.length, i + 1);
    }
  };
  await feed(0.3, 0.6);
  const format: ImportFormat = {
    kind: 'xlsx',
    delimiter: null,
    decimal: o.decimal === ',' ? ',' : '.',
    encoding: null,
    header,
    headerRow: 0,
    sheet: chosen.name,
    sheets: names,
  };
  if (names.length > 1) {
    warnings.push(
      warning(
        'several-sheets',
        `The workbook has ${names.length} sheets (${names.map((n) => `"${n}"`).join(', ')}); ` +
          `sheet "${chosen.name}" was read.`,
        'Choose another sheet in the import settings if needed.',
      ),
    );
  }
  const result = await finishImport(tb, o, format, warnings, () => feed(0.9, 0.1), fileName);
  hooks.onProgress?.(1, rows.length);
  return result;
}

function xlsxHeader(first: Cell[] | undefined): boolean {
  if (!first) return true;
  const present = first.filter((c) => c !== null && c !== undefined && c !== '');
  const numbers = present.filter((c) => typeof c === 'number').length;
  return !(present.length > 0 && numbers > present.length / 2);
}
