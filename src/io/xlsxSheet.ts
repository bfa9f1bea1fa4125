/**
 * A flat (non-recursive) reader of one SpreadsheetML worksheet (ECMA-376 Part 1, §18.3): the sheet's bytes are decoded
 * in chunks cut at row ends, so no string holds the whole sheet and no call nests per row or per cell. Row and cell
 * references (`r`) are optional in the standard; without them a row follows the previous row and a cell the previous
 * cell. Values: shared strings (t="s"), inline strings, formula strings (t="str"), booleans, error cells (their text,
 * e.g. "#DIV/0!"), ISO dates (t="d") and numbers, which become dates when their style's number format is a date format.
 */
import type { Cell } from './tableBuilder';
import { cellAddress, unescapeXml } from './xlsxScan';

/** What the reader found besides the cell values. */
export interface SheetRead {
  /** Rows from sheet row 1, column A; missing cells null; empty rows at the bottom and columns at the right dropped. */
  rows: Cell[][];
  formulas: number;
  /** Formula cells saved without a result (cell reference such as "B3"). */
  formulasWithoutValue: string[];
  /** Merged ranges such as "A2:A4" (§18.3.1.55). */
  merged: string[];
}

/** How number cells of each style are read: `dateStyles[s]` is true when style s formats numbers as dates. */
export interface SheetContext {
  shared: string[];
  dateStyles: boolean[];
  date1904: boolean;
}

const CHUNK_BYTES = 4 * 1024 * 1024;

function attr(attrs: string, name: string): string | undefined {
  const m = new RegExp(`(?:^|\\s)${name}="([^"]*)"`).exec(attrs);
  return m ? m[1] : undefined;
}

/** The text of an `<si>` or `<is>` body: every `<t>` run, phonetic runs (`<rPh>`) left out (§18.4.8). */
export function richText(body: string): string {
  const plain = body.indexOf('<rPh') >= 0 ? body.replace(/<(?:\w+:)?rPh\b[\s\S]*?<\/(?:\w+:)?rPh>/g, '') : body;
  let out = '';
  for (const m of plain.matchAll(/<(?:\w+:)?t(?:\s[^>]*)?>([^<]*)<\/(?:\w+:)?t>/g)) out += m[1];
  return unescapeXml(out);
}

/** The shared-strings table (§18.4.9), in order. */
export function sharedStrings(xml: string | null): string[] {
  if (!xml) return [];
  const out: string[] = [];
  for (const m of xml.matchAll(/<(?:\w+:)?si\b[^>]*?(?:\/>|>([\s\S]*?)<\/(?:\w+:)?si>)/g))
    out.push(richText(m[1] ?? ''));
  return out;
}

/** Built-in number formats that show dates or times (§18.8.30): 14–22, 27–36, 45–47, 50–58. */
const BUILTIN_DATES = new Set([14, 15, 16, 17, 18, 19, 20, 21, 22, 27, 28, 29, 30, 31, 32, 33, 34, 35, 36, 45, 46, 47]);
for (let id = 50; id <= 58; id++) BUILTIN_DATES.add(id);

/** True when a custom number-format code shows a date or time: y, m, d, h or s outside quotes, escapes and brackets. */
export function isDateFormatCode(code: string): boolean {
  const bare = code
    .replace(/"[^"]*"/g, '')
    .replace(/\\./g, '')
    .replace(/\[(?![hms]+\])[^\]]*\]/gi, '')
    .replace(/;@$/, '');
  return /[ymdhs]/i.test(bare) && !/^general$/i.test(bare.trim());
}

/** For each cell style (index into cellXfs, §18.8.10), whether its number format is a date format. */
export function dateStyles(stylesXml: string | null): boolean[] {
  if (!stylesXml) return [];
  const custom = new Map<number, string>();
  for (const m of stylesXml.matchAll(/<(?:\w+:)?numFmt\b([^>]*)\/?>/g)) {
    const id = attr(m[1], 'numFmtId'),
      code = attr(m[1], 'formatCode');
    if (id !== undefined && code !== undefined) custom.set(Number(id), unescapeXml(code));
  }
  const xfs = /<(?:\w+:)?cellXfs\b[^>]*>([\s\S]*?)<\/(?:\w+:)?cellXfs>/.exec(stylesXml)?.[1] ?? '';
  const out: boolean[] = [];
  for (const m of xfs.matchAll(/<(?:\w+:)?xf\b([^>]*?)\/?>/g)) {
    const id = Number(attr(m[1], 'numFmtId') ?? 0);
    const code = custom.get(id);
    out.push(code !== undefined ? isDateFormatCode(code) : BUILTIN_DATES.has(id));
  }
  return out;
}

/** A serial day number of the 1900 or 1904 date system as a UTC Date (Excel's 1900 leap-year bug included). */
export function serialDate(serial: number, date1904: boolean): Date {
  const days = date1904 ? serial + 24_107 : serial < 60 ? serial + 1 : serial;
  return new Date(Math.round((days - 25_569) * 86_400_000));
}

function columnName(col: number): string {
  let s = '';
  for (let n = col + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

function cellValue(attrs: string, body: string, ctx: SheetContext): Cell {
  const t = attr(attrs, 't') ?? 'n';
  if (t === 'inlineStr') {
    const is = /<(?:\w+:)?is\b[^>]*>([\s\S]*?)<\/(?:\w+:)?is>/.exec(body)?.[1];
    return is === undefined ? null : richText(is);
  }
  const v = /<(?:\w+:)?v(?:\s[^>]*)?>([^<]*)<\/(?:\w+:)?v>/.exec(body)?.[1];
  if (v === undefined) return null;
  switch (t) {
    case 's':
      return ctx.shared[Number(v)] ?? null;
    case 'str':
    case 'e':
      return unescapeXml(v);
    case 'b':
      return v.trim() === '1' || v.trim().toLowerCase() === 'true';
    case 'd': {
      const d = new Date(v);
      return Number.isNaN(d.getTime()) ? unescapeXml(v) : d;
    }
    default: {
      const x = Number(v);
      if (v.trim() === '' || Number.isNaN(x)) return unescapeXml(v);
      const s = attr(attrs, 's');
      return s !== undefined && ctx.dateStyles[Number(s)] ? serialDate(x, ctx.date1904) : x;
    }
  }
}

const ROW_END = /<\/(?:\w+:)?row>/g;
const ROW = /<(?:\w+:)?row\b([^>]*?)(?:\/>|>([\s\S]*?)<\/(?:\w+:)?row>)/g;
const CELL = /<(?:\w+:)?c\b([^>]*?)(?:\/>|>([\s\S]*?)<\/(?:\w+:)?c>)/g;
const MERGE = /<(?:\w+:)?mergeCell\b([^>]*?)\/?>/g;

/** Reads a worksheet's XML bytes into rows of cells (see the file comment). `onChunk` is told the bytes done. */
export async function readSheetXml(
  bytes: Uint8Array,
  ctx: SheetContext,
  onChunk?: (doneBytes: number) => Promise<void> | void,
): Promise<SheetRead> {
  const out: SheetRead = { rows: [], formulas: 0, formulasWithoutValue: [], merged: [] };
  let lastRow = 0;
  let width = 0;
  const segment = (text: string) => {
    ROW.lastIndex = 0;
    for (let m = ROW.exec(text); m; m = ROW.exec(text)) {
      const rAttr = attr(m[1], 'r');
      const rowNo = rAttr !== undefined && /^\d+$/.test(rAttr) ? Number(rAttr) : lastRow + 1;
      lastRow = rowNo;
      const cells: Cell[] = [];
      let col = -1;
      const body = m[2] ?? '';
      CELL.lastIndex = 0;
      for (let c = CELL.exec(body); c; c = CELL.exec(body)) {
        const ref = attr(c[1], 'r');
        const at = ref !== undefined ? cellAddress(ref) : null;
        col = at ? at.col : col + 1;
        const inner = c[2] ?? '';
        if (inner.indexOf('f') >= 0 && /<(?:\w+:)?f\b/.test(inner)) {
          out.formulas++;
          if (!/<(?:\w+:)?v\b/.test(inner) && out.formulasWithoutValue.length < 1000)
            out.formulasWithoutValue.push(ref ?? `${columnName(col)}${rowNo}`);
        }
        const value = cellValue(c[1], inner, ctx);
        if (value === null || value === '') continue;
        while (cells.length < col) cells.push(null);
        cells[col] = value;
      }
      if (cells.length === 0) continue;
      while (out.rows.length < rowNo - 1) out.rows.push([]);
      if (out.rows.length >= rowNo) out.rows[rowNo - 1] = cells;
      else out.rows.push(cells);
      if (cells.length > width) width = cells.length;
    }
    MERGE.lastIndex = 0;
    for (let m = MERGE.exec(text); m; m = MERGE.exec(text)) {
      const ref = attr(m[1], 'ref');
      if (ref) out.merged.push(ref);
    }
  };
  const dec = new TextDecoder('utf-8');
  let carry = '';
  for (let off = 0; off < bytes.length; off += CHUNK_BYTES) {
    const end = Math.min(bytes.length, off + CHUNK_BYTES);
    const text = carry + dec.decode(bytes.subarray(off, end), { stream: end < bytes.length });
    let cut = 0;
    ROW_END.lastIndex = 0;
    for (let m = ROW_END.exec(text); m; m = ROW_END.exec(text)) cut = m.index + m[0].length;
    if (end >= bytes.length) cut = text.length;
    segment(text.slice(0, cut));
    carry = text.slice(cut);
    await onChunk?.(end);
  }
  if (carry) segment(carry);
  for (const r of out.rows) while (r.length < width) r.push(null);
  return out;
}
