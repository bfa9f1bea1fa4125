import { formatBytes } from '../core/wording';
import { FulcraError, type Dataset } from '../core/data';
import type { ModelSpec } from '../core/model';

/**
 * Memory guard: rough, deliberately generous estimates of the bytes an import or a fit needs, and a check against
 * what a browser tab can use, so that the worker can refuse a job with a plain message instead of crashing the tab.
 * Counts are of the large typed arrays (8 bytes per float64 cell); small objects are covered by a fixed overhead.
 */

const MiB = 1024 ** 2;
const GiB = 1024 ** 3;

/**
 * Default budget for one tab: 2 GiB. Browsers give no reliable way to read the memory a tab may use:
 * `performance.memory` is Chrome-only, deprecated, absent in workers and counts only the JS heap (not the
 * ArrayBuffers that hold Fulcra's columns); `navigator.deviceMemory` (Chromium, window and worker, secure contexts)
 * is a coarse power of two for the whole device. 2 GiB stays below the point where 64-bit desktop browsers start to
 * fail allocations or end a tab, leaves room for the page itself, and is what a typical 8 GB machine can give one tab.
 */
export const DEFAULT_TAB_BYTES = 2 * GiB;

/** Fixed allowance for code, small objects, strings and the worker's own heap. */
const OVERHEAD = 32 * MiB;

export interface MemoryPart {
  label: string;
  bytes: number;
}

/** An estimate of the peak extra bytes a job needs, with its parts (largest first) for messages and tests. */
export interface MemoryEstimate {
  job: 'import' | 'fit';
  bytes: number;
  rows: number;
  columns: number;
  parts: MemoryPart[];
}

export type BudgetCheck =
  | { ok: true; needed: number; available: number }
  | { ok: false; code: 'too-big'; message: string; suggestion: string; needed: number; available: number };

function estimate(job: MemoryEstimate['job'], rows: number, columns: number, parts: MemoryPart[]): MemoryEstimate {
  const all = [...parts, { label: 'working overhead', bytes: OVERHEAD }]
    .filter((p) => p.bytes > 0)
    .sort((a, b) => b.bytes - a.bytes);
  return { job, rows, columns, bytes: all.reduce((s, p) => s + p.bytes, 0), parts: all };
}

function checkCount(name: string, v: number, min = 0): void {
  if (!(Number.isFinite(v) && v >= min))
    throw new FulcraError('bad-argument', `${name} must be a finite number ≥ ${min}, got ${v}.`);
}

/** What a sample from the start of a file says about its shape. */
export interface ImportShape {
  /** Size of the whole file in bytes. */
  fileBytes: number;
  /** Bytes the sample covers (≤ fileBytes). */
  sampleBytes: number;
  /** Complete records in the sample (header included). */
  sampleRows: number;
  /** Widest record in the sample, in fields. */
  columns: number;
  format: 'delimited' | 'xlsx';
  /** For a workbook: the unpacked bytes its zip entries declare (read before inflating); else 8× the file. */
  unpackedBytes?: number;
}

const DELIMITERS = [',', ';', '\t', '|'];

/**
 * Shape of a delimited file from a text sample of its start (e.g. the first 64 KiB): records are counted at line
 * ends outside quotes (a final partial line is not counted unless the sample is the whole file); the delimiter is
 * the candidate giving the most fields on the widest line. `fileBytes` is the size of the whole file.
 */
export function sampleShape(
  sample: string,
  fileBytes: number,
  sampleBytes = Math.min(fileBytes, sample.length),
): ImportShape {
  checkCount('fileBytes', fileBytes);
  checkCount('sampleBytes', sampleBytes);
  const counts = new Map(DELIMITERS.map((d) => [d, 0]));
  const widest = new Map(DELIMITERS.map((d) => [d, 1]));
  let rows = 0;
  let quoted = false;
  let last = 0;
  for (let i = 0; i < sample.length; i++) {
    const c = sample[i];
    if (c === '"') quoted = !quoted;
    else if (!quoted && counts.has(c)) counts.set(c, counts.get(c)! + 1);
    else if (!quoted && (c === '\n' || c === '\r')) {
      if (c === '\r' && sample[i + 1] === '\n') i++;
      rows++;
      last = i + 1;
      for (const d of DELIMITERS) {
        widest.set(d, Math.max(widest.get(d)!, counts.get(d)! + 1));
        counts.set(d, 0);
      }
    }
  }
  if (sampleBytes >= fileBytes && last < sample.length) {
    rows++;
    for (const d of DELIMITERS) widest.set(d, Math.max(widest.get(d)!, counts.get(d)! + 1));
  }
  const columns = Math.max(...widest.values());
  return { fileBytes, sampleBytes, sampleRows: rows, columns, format: 'delimited' };
}

/** Typical expansion of a workbook: its sheet XML is about 8× the zipped size (common practice; an estimate). */
const XLSX_EXPANSION = 8;
/** Fewest bytes of sheet XML a non-empty cell takes (`<c><v>1</v></c>` is 15), so unpacked ÷ 16 bounds the cells. */
const XLSX_BYTES_PER_CELL = 16;

/**
 * Peak extra bytes to import a file of the given shape: the file's bytes, the decoded text held at once (UTF-16,
 * 2 bytes per character: a 4 MiB chunk pair for delimited text, the whole unzipped sheet for a workbook), and per
 * cell 8 bytes of float64 while reading with up to 2× spare capacity from doubling, the final exact-length column
 * (8), and a code array for text columns (4) — 28 bytes per cell. Rows are scaled from the sample by bytes.
 */
export function estimateImportBytes(shape: ImportShape): MemoryEstimate {
  const { fileBytes, sampleBytes, sampleRows, columns, format } = shape;
  checkCount('fileBytes', fileBytes);
  checkCount('sampleRows', sampleRows);
  checkCount('columns', columns, 1);
  if (format === 'xlsx' && shape.unpackedBytes !== undefined) {
    // The unpacked sheet is held as bytes and decoded in 4 MiB chunks; cells bounded by the sheet's size.
    const unpacked = shape.unpackedBytes;
    checkCount('unpackedBytes', unpacked);
    const cells = Math.ceil(unpacked / XLSX_BYTES_PER_CELL);
    return estimate('import', Math.ceil(cells / columns), columns, [
      { label: 'the file itself', bytes: fileBytes },
      { label: 'the unpacked workbook parts', bytes: unpacked + 2 * 2 * 4 * MiB },
      { label: 'columns being read (8 bytes a cell, room to grow, final copy)', bytes: 28 * cells },
    ]);
  }
  const rows = sampleBytes > 0 && sampleRows > 0 ? Math.ceil((sampleRows * fileBytes) / sampleBytes) : 0;
  const text = format === 'xlsx' ? 2 * XLSX_EXPANSION * fileBytes : 2 * 2 * Math.min(fileBytes, 4 * MiB);
  return estimate('import', rows, columns, [
    { label: 'the file itself', bytes: fileBytes },
    { label: format === 'xlsx' ? 'the unzipped sheet as text' : 'decoded text chunks', bytes: text },
    { label: 'columns being read (8 bytes a cell, room to grow, final copy)', bytes: 28 * rows * columns },
    { label: 'row numbers', bytes: 8 * rows },
  ]);
}

/** Number of design columns (intercept included) the model's terms make, from the dataset's column kinds and levels. */
export function designColumnCount(data: Dataset, spec: ModelSpec): number {
  const width = (name: string): number => {
    const col = data.columns.find((c) => c.name === name);
    if (!col) throw new FulcraError('unknown-column', `There is no column named "${name}".`);
    return col.kind === 'categorical' ? Math.max(1, col.levels.length - 1) : 1;
  };
  let p = 1;
  for (const t of spec.terms) {
    if (t.type === 'main') p += width(t.column);
    else if (t.type === 'spline') p += t.knots - 1;
    else p += width(t.columns[0]) * width(t.columns[1]);
  }
  return p;
}

export interface FitShape {
  /** Rows used (complete cases; the dataset's row count is a safe upper bound). */
  rows: number;
  /** Design columns, intercept included (designColumnCount). */
  designColumns: number;
  /** Predictions and the evaluation record on the same rows. Default true. */
  evaluate?: boolean;
}

/**
 * Peak extra bytes of fit() and, by default, the apparent evaluation on the same rows, counted from design.ts,
 * fit.ts and newton.ts. Fitting holds the design X (standardised in place; profile-likelihood and term refits
 * reuse it) and, when some columns are aliased, a copy without them: at most 2 n×p float64 arrays; per row the
 * outcome, row indices, the solver's η and weights in two slots, fitted risks and the missing-value masks (~20
 * doubles). Evaluation runs after the fit's working arrays are garbage: η comes term by term without a design
 * (a few scratch columns) and ~45 doubles a row (sorts, DeLong placements, calibration fits), and the per-row
 * diagnostics build their design a block of rows at a time; designs in WebAssembly memory may not be freed yet
 * (measured at 10⁵ × 30 through the worker: a peak 20–26 MB higher than with plain arrays). The peak is the larger
 * phase.
 */
export function estimateFitBytes(shape: FitShape): MemoryEstimate {
  const { rows: n, designColumns: p, evaluate = true } = shape;
  checkCount('rows', n);
  checkCount('designColumns', p, 1);
  const np = 8 * n * p;
  const fitPhase: MemoryPart[] = [
    { label: 'design matrix (and a copy without aliased columns)', bytes: 2 * np },
    { label: 'per-row solver arrays', bytes: 8 * 20 * n },
  ];
  const evalPhase: MemoryPart[] = [
    { label: 'linear predictor, scratch columns and evaluation arrays', bytes: 8 * (45 + 8) * n },
    // A design in WebAssembly memory (numerics/wasmPasses.ts) is freed only when the collector gets to it, which it
    // does later than for plain arrays: the fit's design and the calibration fits' can still be held meanwhile.
    { label: 'designs not yet freed (the fit’s and the calibration fits’)', bytes: np + 8 * 7 * n },
    { label: 'one block of the per-row diagnostics’ design', bytes: 8 * p * Math.min(n, 65_536) },
  ];
  const sum = (ps: MemoryPart[]) => ps.reduce((s, q) => s + q.bytes, 0);
  return estimate('fit', n, p, evaluate && sum(evalPhase) > sum(fitPhase) ? evalPhase : fitPhase);
}

/** Bytes held by a dataset's columns (typed arrays; level strings counted at 2 bytes a character). */
export function datasetBytes(data: Dataset): number {
  let b = 0;
  for (const c of data.columns) {
    if (c.kind === 'numeric') b += c.values.byteLength;
    else b += c.codes.byteLength + c.levels.reduce((s, l) => s + 2 * l.length + 16, 0);
  }
  return b;
}

/**
 * Memory a tab can use for one job: DEFAULT_TAB_BYTES, or a quarter of the device memory when the browser reports it
 * (navigator.deviceMemory, GiB, Chromium only), whichever is smaller.
 */
export function availableBytes(): number {
  const nav = (globalThis as { navigator?: { deviceMemory?: unknown } }).navigator;
  const gb = nav?.deviceMemory;
  if (typeof gb === 'number' && Number.isFinite(gb) && gb > 0) return Math.min(DEFAULT_TAB_BYTES, (gb * GiB) / 4);
  return DEFAULT_TAB_BYTES;
}

// formatBytes lives in core (the page uses it; this folder's index would bring the distribution functions along)
export { formatBytes };

/** Parts of an estimate that do not grow with the rows (the rest scale with them, the file itself included). */
const FIXED_PARTS = new Set(['working overhead', 'decoded text chunks']);

/**
 * Compares an estimate with the memory available (default availableBytes(); pass less when data is already held,
 * e.g. availableBytes() − datasetBytes(data)). Over budget: code 'too-big', a plain message with both amounts, and a
 * suggestion with the share of rows that would fit.
 */
export function checkBudget(est: MemoryEstimate, available: number = availableBytes()): BudgetCheck {
  checkCount('available', available);
  const needed = est.bytes;
  if (needed <= available) return { ok: true, needed, available };
  const what = est.job === 'import' ? 'This file needs' : 'This model needs';
  const doing = est.job === 'import' ? 'to open' : 'to fit and check';
  const message =
    `${what} about ${formatBytes(needed)} of memory ${doing}; the tab can use about ` + `${formatBytes(available)}.`;
  // Every part grows with the rows (a sample file is smaller too) except the overhead and the fixed-size text chunks.
  const fixed = est.parts.filter((p) => FIXED_PARTS.has(p.label)).reduce((s, p) => s + p.bytes, 0);
  const share = Math.max(0, Math.min(1, (available - fixed) / Math.max(1, needed - fixed)));
  const rowsFit = Math.floor(share * est.rows * 0.95);
  const sample =
    rowsFit > 0 && est.rows > 0
      ? `a random sample of about ${rowsFit.toLocaleString('en-US')} of the ${est.rows.toLocaleString('en-US')} rows`
      : 'a random sample of the rows';
  const suggestion =
    est.job === 'import'
      ? `Save a copy of the file with only the columns you need, or with ${sample}, and open that.`
      : `Use fewer predictors (each level of a categorical predictor and each spline knot adds a column), or fit ` +
        `on ${sample}.`;
  return { ok: false, code: 'too-big', message, suggestion, needed, available };
}
