import { FulcraError } from '../engine/core';
import { warning, type EngineWarning } from '../engine/core';
import { CellReader } from './cellReader';
import { CsvTokenizer } from './csvTokenizer';
import { ByteTokenizer } from './byteTokenizer';
import { countByte } from './countByte';
import { CHUNK_BYTES, decodeChunks, detectBom, firstInvalidUtf8 } from './decode';
import { detectDecimal, detectDelimiter, detectHeader } from './detectFormat';
import { afterChunk, checkCancelled, finishImport } from './finishImport';
import type { ResolvedOptions } from './options';
import { appendPart, cutPoints, partReaders } from './parallelParse';
import { TableBuilder } from './tableBuilder';
import type { DecimalMark, Delimiter, Encoding, ImportFormat, ImportHooks, ImportResult } from './types';

const SAMPLE_BYTES = 256 * 1024;
/** Share of the progress bar given to the first pass; the rest covers the optional second pass. */
const PASS1 = 0.9;

interface Settings {
  encoding: Encoding;
  /** Bytes skipped before the first record: a byte-order mark and/or a "sep=;" line. */
  bom: number;
  delimiter: Delimiter;
  decimal: DecimalMark;
  header: boolean;
}

/** The name importText gives pasted text (its messages speak of pasted cells, not of a file). */
export const PASTED_TEXT = 'pasted text';

/** A control character in pasted cells, by spreadsheet row and column (tab-separated, the header is row 1). */
function pastedControl(text: string, at: number): FulcraError {
  const before = text.slice(0, at);
  const row = (before.match(/\r\n|\r|\n/g)?.length ?? 0) + 1;
  const line = before.slice(Math.max(before.lastIndexOf('\n'), before.lastIndexOf('\r')) + 1);
  const column = (line.match(/\t/g)?.length ?? 0) + 1;
  const code = text.charCodeAt(at).toString(16).toUpperCase().padStart(4, '0');
  return new FulcraError(
    'not-text',
    `The pasted cells contain a control character (U+${code}) in row ${row}, column ${column}, which a spreadsheet ` +
      'cell does not hold: the text was probably copied from another program than a spreadsheet.',
    'Copy the cells again from the spreadsheet, or delete that character from the text, and paste again.',
  );
}

function settle(
  bytes: Uint8Array,
  o: ResolvedOptions,
  encoding: Encoding,
  bom: number,
  warnings: EngineWarning[],
  pasted = false,
): Settings {
  const end = Math.min(bytes.length, bom + SAMPLE_BYTES);
  const complete = end >= bytes.length;
  const sample = new TextDecoder(encoding, { ignoreBOM: true }).decode(bytes.subarray(bom, end), { stream: !complete });
  if (sample.indexOf('\u0000') >= 0 && !encoding.startsWith('utf-16')) {
    if (pasted) throw pastedControl(sample, sample.indexOf('\u0000'));
    throw new FulcraError(
      'not-text',
      'This file does not look like text: it contains binary bytes.',
      'If it is an Excel workbook, save it as .xlsx (or CSV) and open that; older .xls files are not read.',
    );
  }
  let sample2 = sample;
  let hinted: Delimiter | null = null;
  const sep = /^sep=([,;\t|])\r?\n/i.exec(sample);
  if (sep) {
    hinted = sep[1] as Delimiter;
    bom += sep[0].length * (encoding.startsWith('utf-16') ? 2 : 1);
    sample2 = sample.slice(sep[0].length);
    warnings.push(
      warning(
        'separator-line',
        `The first line "${sep[0].trim()}" names the separator; it was used and skipped, as spreadsheets do ` +
          '(row numbers count from the line after it).',
        'Nothing to do.',
      ),
    );
  }
  let delimiter = o.delimiter !== 'auto' ? o.delimiter : (hinted ?? detectDelimiter(sample2, complete));
  if (delimiter === null) {
    delimiter = ',';
    warnings.push(
      warning(
        'single-column',
        'No separator (comma, semicolon, tab or |) splits the rows, so the file is read as a single column.',
        'If the file has several columns, choose its separator in the import settings.',
      ),
    );
  }
  const decimal =
    o.decimal === 'auto' ? (delimiter === ',' ? '.' : detectDecimal(sample2, delimiter, complete)) : o.decimal;
  const header = o.header === 'auto' ? detectHeader(sample2, delimiter, decimal, complete) : o.header;
  return { encoding, bom, delimiter, decimal, header };
}

/** Line ends (LF, or CR when there is no LF) from `start`, plus an unterminated last line: about the record count. */
function countLines(b: Uint8Array, start: number): number {
  let n = countByte(b, 10, start);
  if (n === 0) n = countByte(b, 13, start);
  const last = b[b.length - 1];
  return last === 10 || last === 13 ? n : n + 1;
}

async function readPass(
  bytes: Uint8Array,
  s: Settings,
  fatal: boolean,
  tb: TableBuilder,
  hooks: ImportHooks,
  from: number,
  span: number,
): Promise<CsvTokenizer | ByteTokenizer> {
  if (s.encoding === 'utf-8' || s.encoding === 'windows-1252') {
    const dec = new TextDecoder(s.encoding, { fatal, ignoreBOM: true });
    const decode = (b: Uint8Array) => dec.decode(b);
    const tok = new ByteTokenizer(bytes, s.bom, s.delimiter, decode, (r) => tb.addBytes(r, decode));
    if (from === 0) tb.expectedRecords = countLines(bytes, s.bom);
    const total = Math.max(1, bytes.length - s.bom);
    while (!tok.done) {
      tok.step(tok.pos + CHUNK_BYTES);
      await afterChunk(hooks, from + span * ((tok.pos - s.bom) / total), tok.records);
    }
    return tok;
  }
  const tok = new CsvTokenizer(s.delimiter, (r) => tb.addSpans(r));
  for (const chunk of decodeChunks(bytes, s.encoding, s.bom, fatal)) {
    tok.feed(chunk.text, chunk.final);
    await afterChunk(hooks, from + span * ((chunk.end - s.bom) / Math.max(1, bytes.length - s.bom)), tok.records);
  }
  return tok;
}

/**
 * The first pass in parts (parallelParse.ts) when helpers are installed and the file allows it: this thread reads
 * the header and the first part, the helpers the others, and their rows are appended in file order. Null when the
 * file is read on one thread instead (nothing installed, too small, no header, not cut safely, parts that do not
 * line up, a helper that failed); invalid UTF-8 in any part throws as the one-thread pass does.
 */
async function readInParts(
  bytes: Uint8Array,
  s: Settings,
  fatal: boolean,
  o: ResolvedOptions,
  hooks: ImportHooks,
): Promise<{ tb: TableBuilder; tok: ByteTokenizer } | null> {
  const inst = partReaders();
  if (!inst || bytes.length < inst.minBytes || !s.header) return null;
  if (s.encoding !== 'utf-8' && s.encoding !== 'windows-1252') return null;
  const tb = new TableBuilder(new CellReader(s.decimal === ',', o.missingTokens), s.header, new Set(o.stripUnits));
  const dec = new TextDecoder(s.encoding, { fatal, ignoreBOM: true });
  const decode = (b: Uint8Array) => dec.decode(b);
  const tok = new ByteTokenizer(bytes, s.bom, s.delimiter, decode, (r) => tb.addBytes(r, decode));
  tb.expectedRecords = countLines(bytes, s.bom);
  // the header: records one at a time until the first non-blank one
  let headerStart = tok.pos;
  while (tb.headerRow === 0 && !tok.done) {
    headerStart = tok.pos;
    tok.step(tok.pos + 1);
  }
  const cuts = tb.headerRow === 0 ? null : cutPoints(bytes, tok.pos, inst.readers.helpers + 1);
  if (!cuts) return null;
  const header = bytes.slice(headerStart, tok.pos);
  const ends = [...cuts.slice(1), bytes.length];
  const parts = cuts.map((a, k) =>
    inst.readers.read(
      {
        header,
        // bytes in shared memory (the command line's large files) are read in place; others are copied and moved
        part: bytes.buffer instanceof ArrayBuffer ? bytes.slice(a, ends[k]) : bytes.subarray(a, ends[k]),
        encoding: s.encoding,
        delimiter: s.delimiter,
        decimalComma: s.decimal === ',',
        missingTokens: o.missingTokens,
        stripUnits: o.stripUnits,
        fatal,
      },
      k,
    ),
  );
  const settled = Promise.allSettled(parts);
  const end = cuts[0],
    span = Math.max(1, end - s.bom);
  while (tok.pos < end) {
    tok.step(Math.min(end, tok.pos + CHUNK_BYTES));
    await afterChunk(hooks, PASS1 * ((tok.pos - s.bom) / span), tb.records);
  }
  const read = await settled;
  if (read.some((r) => r.status === 'fulfilled' && r.value.invalidUtf8)) throw new TypeError('invalid UTF-8');
  for (const r of read) {
    if (r.status === 'rejected' || !appendPart(tb, r.value)) return null;
    tok.lineEnds.lf += r.value.lineEnds.lf;
    tok.lineEnds.crlf += r.value.lineEnds.crlf;
    tok.lineEnds.cr += r.value.lineEnds.cr;
  }
  return { tb, tok };
}

function tokenizerWarnings(tok: CsvTokenizer | ByteTokenizer, names: string[]): EngineWarning[] {
  const w: EngineWarning[] = [];
  const where = (i: { record: number; field: number }) =>
    `row ${i.record + 1}, column ${names[i.field] ? `"${names[i.field]}"` : i.field + 1}`;
  const unclosed = tok.issues.find((i) => i.kind === 'unclosed-quote');
  if (unclosed) {
    w.push(
      warning(
        'unclosed-quote',
        `At ${where(unclosed)} a quote (") opens but never closes, ` +
          'so the rest of the file was read into that one cell.',
        'Close the quote or remove it in the file, then open it again.',
      ),
    );
  }
  const stray = tok.issues.filter((i) => i.kind === 'stray-quote');
  if (stray.length > 0) {
    w.push(
      warning(
        'stray-quote',
        `${stray.length === 1 ? 'A cell has' : `${stray.length} cells have`} text after a closing quote ` +
          `(first at ${where(stray[0])}); the text was kept.`,
        'Check those cells: quotes inside a quoted value must be doubled ("").',
      ),
    );
  }
  const { lf, crlf, cr } = tok.lineEnds;
  if ((lf > 0 ? 1 : 0) + (crlf > 0 ? 1 : 0) + (cr > 0 ? 1 : 0) > 1) {
    w.push(
      warning(
        'mixed-line-endings',
        'The file mixes line-end styles (Windows, Unix, old Mac); all were read as row ends.',
        'Nothing to do; check the row count if the file was pieced together.',
      ),
    );
  }
  return w;
}

/** Imports delimited text bytes (CSV, TSV, semicolon with decimal comma) in chunks; see `importFile`. */
export async function importDelimited(
  bytes: Uint8Array,
  fileName: string,
  o: ResolvedOptions,
  hooks: ImportHooks,
): Promise<ImportResult> {
  checkCancelled(hooks);
  if (bytes.length === 0) {
    throw new FulcraError(
      'empty-file',
      `"${fileName}" is empty (0 bytes).`,
      'Choose the file again, or save it again from the spreadsheet.',
    );
  }
  const warnings: EngineWarning[] = [];
  const bom = detectBom(bytes);
  const wanted = o.encoding === 'auto' ? (bom?.encoding ?? 'utf-8') : o.encoding;
  const bomLength = bom && bom.encoding === wanted ? bom.length : 0;
  let s = settle(bytes, o, wanted, bomLength, warnings, fileName === PASTED_TEXT);
  const run = async (fatal: boolean) => {
    const inParts = await readInParts(bytes, s, fatal, o, hooks);
    if (inParts) return inParts;
    const tb = new TableBuilder(new CellReader(s.decimal === ',', o.missingTokens), s.header, new Set(o.stripUnits));
    const tok = await readPass(bytes, s, fatal, tb, hooks, 0, PASS1);
    return { tb, tok };
  };
  let read: Awaited<ReturnType<typeof run>>;
  try {
    read = await run(o.encoding === 'auto' && wanted === 'utf-8');
  } catch (e) {
    const at = e instanceof TypeError ? firstInvalidUtf8(bytes) : -1;
    if (at < 0) throw e;
    const hex = Array.from(bytes.subarray(at, at + 2), (b) => b.toString(16).toUpperCase().padStart(2, '0')).join(' ');
    warnings.length = 0;
    s = settle(bytes, o, 'windows-1252', 0, warnings);
    warnings.push(
      warning(
        'encoding-fallback',
        `The file is not UTF-8 (byte ${at}: ${hex}), so it was read as Windows-1252 (Western European).`,
        "If accented letters look wrong, choose the file's encoding in the import settings, or save it as CSV UTF-8.",
      ),
    );
    read = await run(false);
  }
  const { tb, tok } = read;
  warnings.push(...tokenizerWarnings(tok, tb.namer.names));
  const format: ImportFormat = {
    kind: 'delimited',
    delimiter: s.delimiter,
    decimal: s.decimal,
    encoding: s.encoding,
    header: s.header,
    headerRow: 0,
  };
  const result = await finishImport(
    tb,
    o,
    format,
    warnings,
    async () => {
      await readPass(bytes, s, false, tb, hooks, PASS1, 1 - PASS1);
    },
    fileName,
  );
  hooks.onProgress?.(1, tb.records);
  return result;
}
