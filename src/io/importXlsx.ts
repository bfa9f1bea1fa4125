import { FulcraError } from '../engine/core';
import { availableBytes, estimateImportBytes, formatBytes } from '../engine/fitting';
import { warning, type EngineWarning } from '../engine/core';
import { CellReader } from './cellReader';
import { afterChunk, checkCancelled, finishImport } from './finishImport';
import type { ResolvedOptions } from './options';
import { plural } from './rows';
import { TableBuilder, type Cell } from './tableBuilder';
import type { ImportFormat, ImportHooks, ImportResult } from './types';
import { cellAddress, workbookSheets } from './xlsxScan';
import { dateStyles, readSheetXml, sharedStrings, type SheetRead } from './xlsxSheet';
import { listZip, looksLikeOle, looksLikeZip, readZipEntry, readZipText, type ZipEntry } from './zip';

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
  checkUnpackedSize(bytes.length, entries, fileName);
  const wb = await readZipText(bytes, entries, 'xl/workbook.xml');
  if (wb === null)
    throw new FulcraError(
      'not-xlsx',
      `"${fileName}" is a zip archive but not an Excel workbook (it has no xl/workbook.xml).`,
      'Open it in the program that made it and save it as .xlsx.',
    );
  const rels = (await readZipText(bytes, entries, 'xl/_rels/workbook.xml.rels')) ?? '';
  return { entries, sheets: workbookSheets(wb, rels), workbookXml: wb, rels };
}

/**
 * Refuses, before anything is inflated, a workbook whose parts declare more unpacked bytes than the tab can hold
 * while reading them (a zip bomb, or simply too big). The estimate is the import guard's (estimateImportBytes).
 */
export function checkUnpackedSize(
  fileBytes: number,
  entries: ZipEntry[],
  fileName: string,
  available = availableBytes(),
) {
  const unpacked = entries.reduce((s, e) => s + e.uncompressedSize, 0);
  const est = estimateImportBytes({
    fileBytes,
    sampleBytes: fileBytes,
    sampleRows: 1,
    columns: 1,
    format: 'xlsx',
    unpackedBytes: unpacked,
  });
  if (est.bytes <= available) return;
  throw new FulcraError(
    'xlsx-too-big',
    `"${fileName}" would unpack to about ${formatBytes(unpacked)} (the sizes its parts declare), and reading it ` +
      `needs about ${formatBytes(est.bytes)} of memory; the tab can use about ${formatBytes(available)}. ` +
      'It was not unpacked.',
    'If the workbook is genuine, save the sheet you need as CSV (or a copy with fewer rows or columns) and open that.',
  );
}

/** The path of the workbook part of the given relationship type (e.g. "styles"), or its usual place. */
function partPath(rels: string, type: string, usual: string): string {
  for (const m of rels.matchAll(/<Relationship\b([^>]*)\/?>/g)) {
    const t = /\sType="([^"]*)"/.exec(m[1])?.[1] ?? '';
    const target = /\sTarget="([^"]*)"/.exec(m[1])?.[1];
    if (target && t.endsWith(`/${type}`)) return target.startsWith('/') ? target.slice(1) : `xl/${target}`;
  }
  return usual;
}

/** Imports one sheet of an .xlsx workbook (values as last saved; formulas are not recalculated). */
export async function importXlsx(
  bytes: Uint8Array,
  fileName: string,
  o: ResolvedOptions,
  hooks: ImportHooks,
): Promise<ImportResult> {
  checkCancelled(hooks);
  const { entries, sheets, workbookXml, rels } = await workbookParts(bytes, fileName);
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
  const sheetEntry = entries.find((e) => e.name === chosen.path);
  if (!sheetEntry)
    throw new FulcraError(
      'bad-xlsx',
      `The sheet "${chosen.name}" of "${fileName}" could not be read: the workbook lists it, but its part is missing.`,
      'Open the workbook in the spreadsheet, save it again as .xlsx, and retry.',
    );
  let read: SheetRead;
  {
    const ctx = {
      shared: sharedStrings(await readZipText(bytes, entries, partPath(rels, 'sharedStrings', 'xl/sharedStrings.xml'))),
      dateStyles: dateStyles(await readZipText(bytes, entries, partPath(rels, 'styles', 'xl/styles.xml'))),
      date1904: /<(?:\w+:)?workbookPr\b[^>]*\sdate1904="(?:1|true)"/.test(workbookXml),
    };
    const xml = await readZipEntry(bytes, sheetEntry);
    read = await readSheetXml(xml, ctx, (done) => afterChunk(hooks, (0.3 * done) / Math.max(1, xml.length), 0));
  }
  const rows = read.rows;
  await afterChunk(hooks, 0.3, 0);
  const warnings: EngineWarning[] = [];
  if (read.formulas > 0) {
    warnings.push(
      warning(
        'formulas',
        `${plural(read.formulas, 'cell holds a formula', 'cells hold formulas')}; ` +
          'the results last saved by the spreadsheet are used, not recalculated.',
        'If the results may be out of date, open the workbook in the spreadsheet, let it recalculate, and save it.',
      ),
    );
  }
  if (read.formulasWithoutValue.length > 0) {
    warnings.push(
      warning(
        'formula-no-value',
        `${plural(read.formulasWithoutValue.length, 'formula cell has', 'formula cells have')} no saved result ` +
          `(${read.formulasWithoutValue.slice(0, 5).join(', ')}); read as missing.`,
        'Open the workbook in the spreadsheet, let it recalculate, and save it.',
      ),
    );
  }
  if (read.merged.length > 0) warnings.push(mergedWarning(read.merged));
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

/** "A2:A4" → "A2:A4 (rows 3–4 of column A)": the cells of a merged range other than its top-left one. */
function mergedCells(range: string): string {
  const [a, b] = range.split(':').map((r) => cellAddress(r));
  if (!a || !b) return range;
  const col = (c: number) => /^([A-Z]+)/.exec(range.split(':')[c === a.col ? 0 : 1])?.[1] ?? '';
  const span = (x: number, y: number) => (x === y ? `${x}` : `${x}–${y}`);
  if (a.col === b.col)
    return `${range} (${b.row === a.row + 1 ? 'row' : 'rows'} ${span(a.row + 1, b.row)} of column ${col(a.col)})`;
  if (a.row === b.row) return `${range} (row ${a.row}, columns after ${col(a.col)} to ${col(b.col)})`;
  return `${range} (rows ${span(a.row, b.row)}, columns ${col(a.col)} to ${col(b.col)}, except the top-left cell)`;
}

function mergedWarning(ranges: string[]): EngineWarning {
  const shown = ranges.slice(0, 5).map(mergedCells).join('; ') + (ranges.length > 5 ? '; …' : '');
  return warning(
    'merged-cells',
    `The sheet has ${plural(ranges.length, 'merged range', 'merged ranges')}: ${shown}. A merged range keeps ` +
      'its value only in its top-left cell, so its other cells are read as missing.',
    'In the spreadsheet, unmerge the cells and fill the value into every row it applies to, then open the ' +
      'workbook again.',
  );
}

function xlsxHeader(first: Cell[] | undefined): boolean {
  if (!first) return true;
  const present = first.filter((c) => c !== null && c !== undefined && c !== '');
  const numbers = present.filter((c) => typeof c === 'number').length;
  return !(present.length > 0 && numbers > present.length / 2);
}
