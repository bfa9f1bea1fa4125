/**
 * Reading a large delimited file on several threads. The bytes are cut into parts at line ends; this thread reads
 * the first part (header included) into its TableBuilder while helpers (Web Workers, worker_threads) read the others,
 * each into a TableBuilder of its own that first reads the header line, so its columns, names and unit stripping are
 * those of the first part. The parts' columns are then appended in file order, with their row numbers moved on by
 * the records before them, so the result is the one reading the whole file on one thread gives, cell for cell,
 * count for count and message for message (tests/io/parallelParse.test.ts compares them).
 *
 * Only where a cut cannot fall inside a record, and the parts line up without looking: UTF-8 or Windows-1252 bytes
 * (single-byte line ends), a header row, no quote character anywhere in the file (a quoted cell may hold a line end),
 * line feeds as line ends. A part whose rows are wider than the header (new columns) or a first part that widened
 * sends the whole file back to one thread.
 */
import { ByteTokenizer } from './byteTokenizer';
import { countByte } from './countByte';
import { CellReader } from './cellReader';
import type { ColumnBuilder, RowSample } from './columnBuilder';
import type { TableBuilder } from './tableBuilder';
import { TableBuilder as Builder } from './tableBuilder';
import type { Delimiter, Encoding } from './types';

const QUOTE = 34,
  LF = 10;

/** What a helper needs to read one part. */
export interface PartJob {
  /** The header line (its bytes, line end included). */
  header: Uint8Array;
  /** The part: whole lines. */
  part: Uint8Array;
  encoding: Encoding;
  delimiter: Delimiter;
  decimalComma: boolean;
  missingTokens: readonly string[];
  stripUnits: readonly string[];
  /** Invalid UTF-8 is an error (the caller then reads the file as Windows-1252). */
  fatal: boolean;
}

/** One column of a part, as plain data (structured-clone safe; the arrays may be transferred). */
export interface ColumnPart {
  n: number;
  values: Float64Array;
  codes: Int32Array | null;
  levels: string[];
  levelCounts: number[];
  numberCount: number;
  textCount: number;
  missingCount: number;
  tokenCounts: [string, number][];
  textCells: RowSample;
  errorCells: RowSample;
  thousandsCells: RowSample;
  leadingZeroCells: RowSample;
  trimmedCells: RowSample;
  unitsStripped: [string, number][];
  maxLength: number;
  maxLengthRow: number;
}

/** A part read by a helper. Row numbers count the header line as 1 (the part's first line is 2). */
export interface TablePart {
  /** Lines of the part (blank ones included). */
  records: number;
  nRows: number;
  sourceRows: Int32Array;
  blankRows: RowSample;
  shortRows: RowSample;
  longRows: RowSample;
  lineEnds: { lf: number; crlf: number; cr: number };
  cols: ColumnPart[];
  /** Set when invalid UTF-8 stopped the part (with `fatal`). */
  invalidUtf8?: boolean;
}

/** Reads parts on helper threads; installed by the host (the engine worker, `npm run fit`). */
export interface PartReaders {
  /** Helpers available (the parts beyond the first). */
  readonly helpers: number;
  read(job: PartJob, helper: number): Promise<TablePart>;
}

let installed: { readers: PartReaders; minBytes: number } | null = null;

/** Files of at least this many bytes are read in parts when helpers are installed. */
export const PARALLEL_MIN_BYTES = 16 * 2 ** 20;

/** Makes large delimited imports read their parts on these helpers (null: one thread). */
export function installPartReaders(readers: PartReaders | null, minBytes = PARALLEL_MIN_BYTES): void {
  installed = readers && readers.helpers > 0 ? { readers, minBytes } : null;
}

export function partReaders(): { readers: PartReaders; minBytes: number } | null {
  return installed;
}

/** Reads one part (the helpers' work): the header line, then the part's lines, into a TableBuilder of its own. */
export function readPart(job: PartJob): TablePart {
  const tb = new Builder(new CellReader(job.decimalComma, job.missingTokens), true, new Set(job.stripUnits));
  const dec = new TextDecoder(job.encoding, { fatal: job.fatal, ignoreBOM: true });
  const decode = (b: Uint8Array) => dec.decode(b);
  tb.expectedRecords = countLineFeeds(job.part) + 1;
  try {
    new ByteTokenizer(job.header, 0, job.delimiter, decode, (r) => tb.addBytes(r, decode)).step(job.header.length);
    const tok = new ByteTokenizer(job.part, 0, job.delimiter, decode, (r) => tb.addBytes(r, decode));
    tok.step(job.part.length);
    return tablePart(tb, tok.lineEnds);
  } catch (e) {
    if (e instanceof TypeError && job.fatal) return { ...emptyPart(), invalidUtf8: true };
    throw e;
  }
}

function emptyPart(): TablePart {
  const none = (): RowSample => ({ count: 0, rows: [], examples: [] });
  return {
    records: 0,
    nRows: 0,
    sourceRows: new Int32Array(0),
    blankRows: none(),
    shortRows: none(),
    longRows: none(),
    lineEnds: { lf: 0, crlf: 0, cr: 0 },
    cols: [],
  };
}

function countLineFeeds(b: Uint8Array): number {
  return countByte(b, LF);
}

function tablePart(tb: TableBuilder, lineEnds: TablePart['lineEnds']): TablePart {
  return {
    records: tb.records - 1,
    nRows: tb.nRows,
    sourceRows: tb.rowNumbers(),
    blankRows: tb.blankRows,
    shortRows: tb.shortRows,
    longRows: tb.longRows,
    lineEnds,
    cols: tb.cols.map(columnPart),
  };
}

function columnPart(c: ColumnBuilder): ColumnPart {
  return {
    n: c.n,
    values: c.values.slice(0, c.n),
    codes: c.codes ? c.codes.slice(0, c.n) : null,
    levels: [...c.levels],
    levelCounts: [...c.levelCounts],
    numberCount: c.numberCount,
    textCount: c.textCount,
    missingCount: c.missingCount,
    tokenCounts: [...c.tokenCounts],
    textCells: c.textCells,
    errorCells: c.errorCells,
    thousandsCells: c.thousandsCells,
    leadingZeroCells: c.leadingZeroCells,
    trimmedCells: c.trimmedCells,
    unitsStripped: [...c.unitsStripped],
    maxLength: c.maxLength,
    maxLengthRow: c.maxLengthRow,
  };
}

/** The ArrayBuffers of a part, to transfer instead of copying. */
export function partTransferables(p: TablePart): ArrayBuffer[] {
  const out: ArrayBuffer[] = [p.sourceRows.buffer as ArrayBuffer];
  for (const c of p.cols) {
    out.push(c.values.buffer as ArrayBuffer);
    if (c.codes) out.push(c.codes.buffer as ArrayBuffer);
  }
  return out;
}

/**
 * Where to cut `bytes` (from `from`, the first data line) into `parts` parts of about equal size: the offsets just
 * after a line feed, ascending; fewer when the lines are too long. Null when the file cannot be cut safely: a quote
 * character anywhere, or no line feed.
 */
export function cutPoints(bytes: Uint8Array, from: number, parts: number): number[] | null {
  if (bytes.indexOf(QUOTE) >= 0) return null;
  const cuts: number[] = [];
  let last = from;
  for (let k = 1; k < parts; k++) {
    const target = from + Math.floor(((bytes.length - from) * k) / parts);
    if (target <= last) continue;
    const lf = bytes.indexOf(LF, target);
    if (lf < 0 || lf + 1 >= bytes.length) break;
    cuts.push(lf + 1);
    last = lf + 1;
  }
  return cuts.length > 0 ? cuts : null;
}

/** Appends a sample's entries after `into`'s (rows moved on by `offset`), keeping the first few as one pass does. */
function appendSample(into: RowSample, from: RowSample, offset: number, keep: number): void {
  into.count += from.count;
  for (let q = 0; q < from.rows.length && into.rows.length < keep; q++) {
    into.rows.push(from.rows[q] + offset);
    into.examples.push(from.examples[q]);
  }
}

const SAMPLE = 5;

function appendCounts(into: Map<string, number>, from: [string, number][]): void {
  for (const [k, v] of from) into.set(k, (into.get(k) ?? 0) + v);
}

/** Appends column part `c` (rows moved on by `offset`) to column `b`, as if its cells had followed. */
function appendColumn(b: ColumnBuilder, c: ColumnPart, offset: number): void {
  const n0 = b.n,
    n = n0 + c.n;
  if (b.values.length < n) {
    const grown = new Float64Array(n);
    grown.set(b.values.subarray(0, n0));
    b.values = grown;
    if (b.codes) {
      const g = new Int32Array(n);
      g.set(b.codes.subarray(0, n0));
      b.codes = g;
    }
  }
  b.values.set(c.values, n0);
  // the first text cell of the column may be in this part: codes for the cells before it, as addLevel makes them
  if (c.codes) b.ensureCodes();
  if (b.codes) {
    if (c.codes) {
      const map = c.levels.map((l, k) => {
        const code = b.levelCode(l);
        b.levelCounts[code] += c.levelCounts[k];
        return code;
      });
      for (let i = 0; i < c.n; i++) b.codes[n0 + i] = c.codes[i] >= 0 ? map[c.codes[i]] : c.codes[i];
    } else for (let i = 0; i < c.n; i++) b.codes[n0 + i] = Number.isNaN(c.values[i]) ? -1 : -2;
  }
  b.n = n;
  b.numberCount += c.numberCount;
  b.textCount += c.textCount;
  b.missingCount += c.missingCount;
  appendCounts(b.tokenCounts, c.tokenCounts);
  appendCounts(b.unitsStripped, c.unitsStripped);
  appendSample(b.textCells, c.textCells, offset, SAMPLE);
  appendSample(b.errorCells, c.errorCells, offset, SAMPLE);
  appendSample(b.thousandsCells, c.thousandsCells, offset, SAMPLE);
  appendSample(b.leadingZeroCells, c.leadingZeroCells, offset, SAMPLE);
  appendSample(b.trimmedCells, c.trimmedCells, offset, SAMPLE);
  if (c.maxLength > b.maxLength) {
    b.maxLength = c.maxLength;
    b.maxLengthRow = c.maxLengthRow + offset;
  }
}

/**
 * Appends a helper's part to `tb` (which holds every line before it: `tb.records` of them) as if its lines had
 * followed. False, with `tb` unchanged, when the part's columns do not line up with `tb`'s.
 */
export function appendPart(tb: TableBuilder, part: TablePart): boolean {
  if (part.cols.length !== tb.cols.length) return false;
  // the part's row r (header = 1) is the file's row r − 1 + the lines before the part
  const offset = tb.records - 1;
  tb.cols.forEach((b, j) => appendColumn(b, part.cols[j], offset));
  tb.appendRows(part.sourceRows, offset);
  appendSample(tb.blankRows, part.blankRows, offset, SAMPLE);
  appendSample(tb.shortRows, part.shortRows, offset, SAMPLE);
  appendSample(tb.longRows, part.longRows, offset, SAMPLE);
  tb.records += part.records;
  return true;
}

/** A helper thread as the part readers see it (a Web Worker, a MessagePort, a Node worker thread). */
export interface PartEndpoint {
  postMessage(message: unknown, transfer: ArrayBuffer[]): void;
  /** Registers the handler of the helper's messages (others than part replies are ignored by it). */
  onReply(handler: (data: unknown) => void): void;
  /** Node: keep the process alive while the helper reads a part (its worker is otherwise unref'd). */
  busy?(on: boolean): void;
  /** Registers what to do when the helper dies: its parts in reading then fail (and the file goes to one thread). */
  onFailure?(handler: () => void): void;
}

/** A part not answered by then fails (the file is then read on one thread): a helper that hangs must not. */
export const PART_TIMEOUT_MS = 120_000;

type PartReply = { partId: number; part?: TablePart; error?: string };

/** Part readers over helpers that take messages ({partId, part: job}) and answer with answerPart. */
export function messagePartReaders(endpoints: PartEndpoint[], timeoutMs = PART_TIMEOUT_MS): PartReaders {
  /** Parts in reading: their helper, and how to settle them. */
  const waiting = new Map<number, { helper: number; settle: (r: PartReply) => void }>();
  let next = 0;
  endpoints.forEach((e, helper) => {
    e.onReply((data) => {
      const r = data as PartReply | null;
      if (r && typeof r === 'object' && typeof r.partId === 'number') waiting.get(r.partId)?.settle(r);
    });
    e.onFailure?.(() => {
      for (const [partId, w] of [...waiting])
        if (w.helper === helper) w.settle({ partId, error: 'the helper reading this part stopped' });
    });
  });
  return {
    helpers: endpoints.length,
    read: (job, k) =>
      new Promise<TablePart>((resolve, reject) => {
        const helper = k % endpoints.length,
          e = endpoints[helper],
          partId = ++next;
        const timer = setTimeout(
          () => waiting.get(partId)?.settle({ partId, error: `no answer from a helper in ${timeoutMs / 1000} s` }),
          timeoutMs,
        );
        waiting.set(partId, {
          helper,
          settle: (r) => {
            waiting.delete(partId);
            clearTimeout(timer);
            e.busy?.(false);
            if (r.part) resolve(r.part);
            else reject(new Error(r.error ?? 'a helper could not read its part of the file'));
          },
        });
        e.busy?.(true);
        // a part in shared memory is shared, not moved (a SharedArrayBuffer cannot be transferred)
        e.postMessage({ partId, part: job }, job.part.buffer instanceof ArrayBuffer ? [job.part.buffer] : []);
      }),
  };
}

/** The helper's side: reads the part a message asks for and posts it back; false for any other message. */
export function answerPart(message: unknown, post: (reply: PartReply, transfer: ArrayBuffer[]) => void): boolean {
  const m = message as { partId?: unknown; part?: PartJob } | null;
  if (!m || typeof m !== 'object' || typeof m.partId !== 'number' || !m.part) return false;
  try {
    const part = readPart(m.part);
    post({ partId: m.partId, part }, partTransferables(part));
  } catch (e) {
    post({ partId: m.partId, error: e instanceof Error ? e.message : String(e) }, []);
  }
  return true;
}
