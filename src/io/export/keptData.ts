/**
 * The loaded data kept in this browser's storage (IndexedDB) in pieces, written and read by the worker so the page's
 * thread never serialises them. Each column (and the spreadsheet row numbers, when listed) is cut into pieces of at
 * most `rowsPerPiece` rows (16 MB of numbers), each stored under a key of its own; a small manifest (data id, shape,
 * column names, kinds and levels, the piece keys) is written last, so a half-written store is never taken as
 * complete. Reading checks every piece against the manifest (present, the right kind, the right length).
 */
import { FulcraError, type Dataset } from '../../engine/core';
import { classifyStorageError, WORKSPACE_KEY, type KeyValueBackend } from './persist';

export const KEPT_PREFIX = `${WORKSPACE_KEY}:kept`;
/** The manifest's key: one set of kept data at a time. */
export const MANIFEST_KEY = `${KEPT_PREFIX}:manifest`;
/** 2^21 rows: 16 MB of Float64 per piece, far below Chromium's ~133 MB limit on one stored value. */
export const ROWS_PER_PIECE = 2 ** 21;
export const KEPT_FORMAT = 1;

export interface KeptColumn {
  name: string;
  kind: 'numeric' | 'categorical';
  /** Categorical columns only. */
  levels?: string[];
  pieces: string[];
}

export interface KeptManifest {
  fulcraKept: typeof KEPT_FORMAT;
  dataId: string;
  nRows: number;
  rowsPerPiece: number;
  firstRow?: number;
  /** Piece keys of the listed spreadsheet row numbers (Int32), or null when the rows are numbered from firstRow. */
  rowNumbers: string[] | null;
  columns: KeptColumn[];
  /** Bytes of column values written. */
  bytes: number;
  saved: string;
}

/** What was read back: the data and when they were kept. */
export interface KeptData {
  data: Dataset;
  saved: string;
}

const pieceKey = (dataId: string, part: string, k: number) => `${KEPT_PREFIX}:${dataId}:${part}:${k}`;

/** Bytes the data take in storage (column values and listed row numbers). */
export function keptBytes(data: Dataset): number {
  let bytes = data.rowNumbers ? data.rowNumbers.byteLength : 0;
  for (const c of data.columns) bytes += c.kind === 'numeric' ? c.values.byteLength : c.codes.byteLength;
  return bytes;
}

/**
 * Deletes the kept data: the manifest first (so nothing half-deleted is ever read as whole), then the pieces it
 * lists and, when the backend can list its keys, any other piece a closed tab left behind.
 */
export async function forgetKeptData(backend: KeyValueBackend): Promise<void> {
  try {
    const old = (await backend.get(MANIFEST_KEY)) as Partial<KeptManifest> | undefined;
    await backend.del(MANIFEST_KEY);
    const listed = Array.isArray(old?.columns)
      ? [...old.columns.flatMap((c) => (Array.isArray(c?.pieces) ? c.pieces : [])), ...(old.rowNumbers ?? [])]
      : [];
    const stray = backend.keys ? (await backend.keys()).filter((k) => k.startsWith(`${KEPT_PREFIX}:`)) : [];
    for (const k of new Set([...listed, ...stray])) await backend.del(k);
  } catch (e) {
    throw classifyStorageError(e);
  }
}

/** The id of the data kept now, or null when none (or an unreadable manifest). */
export async function keptDataId(backend: KeyValueBackend): Promise<string | null> {
  try {
    const m = (await backend.get(MANIFEST_KEY)) as Partial<KeptManifest> | undefined;
    return typeof m?.dataId === 'string' && m.fulcraKept === KEPT_FORMAT ? m.dataId : null;
  } catch (e) {
    throw classifyStorageError(e);
  }
}

/**
 * Keeps `data` under `dataId`, replacing whatever was kept before (deleted first, to make room). Pieces are copies
 * (a view would store its whole buffer). `pause` runs between pieces (the worker yields there). Rejects with a
 * PersistError when storage refuses; the pieces already written are then deleted again.
 */
export async function writeKeptData(
  backend: KeyValueBackend,
  dataId: string,
  data: Dataset,
  options: { saved: string; rowsPerPiece?: number; pause?: () => Promise<void> },
): Promise<KeptManifest> {
  const per = options.rowsPerPiece ?? ROWS_PER_PIECE;
  const n = data.nRows;
  const pieceCount = Math.ceil(n / per);
  await forgetKeptData(backend);
  const written: string[] = [];
  const put = async (key: string, values: Float64Array | Int32Array) => {
    await backend.set(key, values);
    written.push(key);
    await options.pause?.();
  };
  const cut = async (part: string, values: Float64Array | Int32Array): Promise<string[]> => {
    const keys: string[] = [];
    for (let k = 0; k < pieceCount; k++) {
      const key = pieceKey(dataId, part, k);
      await put(key, values.slice(k * per, Math.min(n, (k + 1) * per)));
      keys.push(key);
    }
    return keys;
  };
  try {
    const columns: KeptColumn[] = [];
    for (let j = 0; j < data.columns.length; j++) {
      const c = data.columns[j];
      columns.push(
        c.kind === 'numeric'
          ? { name: c.name, kind: 'numeric', pieces: await cut(`c${j}`, c.values) }
          : { name: c.name, kind: 'categorical', levels: [...c.levels], pieces: await cut(`c${j}`, c.codes) },
      );
    }
    const manifest: KeptManifest = {
      fulcraKept: KEPT_FORMAT,
      dataId,
      nRows: n,
      rowsPerPiece: per,
      ...(data.firstRow !== undefined ? { firstRow: data.firstRow } : {}),
      rowNumbers: data.rowNumbers ? await cut('rows', data.rowNumbers) : null,
      columns,
      bytes: keptBytes(data),
      saved: options.saved,
    };
    await backend.set(MANIFEST_KEY, manifest);
    return manifest;
  } catch (e) {
    for (const k of written) await backend.del(k).catch(() => undefined);
    throw classifyStorageError(e);
  }
}

/** Kept data that cannot be read back whole; the message says what is wrong in plain words. */
const damaged = (what: string) =>
  new FulcraError(
    'kept-data-damaged',
    `The data kept in this browser are incomplete (${what}).`,
    'Open your file again, or a saved workspace file.',
  );

/**
 * Reads the data kept under `dataId` back into new typed arrays. Resolves to null when nothing is kept or the
 * manifest belongs to other data (another load; the caller says the data are missing). A manifest or piece that
 * does not add up (missing, of another kind, short or long) rejects with FulcraError 'kept-data-damaged' naming
 * the column and piece; storage failures reject with a PersistError.
 */
export async function readKeptData(
  backend: KeyValueBackend,
  dataId: string,
  pause?: () => Promise<void>,
): Promise<KeptData | null> {
  const get = async (key: string): Promise<unknown> => {
    try {
      return await backend.get(key);
    } catch (e) {
      throw classifyStorageError(e);
    }
  };
  const raw = (await get(MANIFEST_KEY)) as Partial<KeptManifest> | undefined;
  if (!raw || typeof raw !== 'object' || raw.dataId !== dataId) return null;
  const m = raw;
  if (
    m.fulcraKept !== KEPT_FORMAT ||
    !Number.isInteger(m.nRows) ||
    (m.nRows as number) < 0 ||
    !Number.isInteger(m.rowsPerPiece) ||
    (m.rowsPerPiece as number) < 1 ||
    !Array.isArray(m.columns) ||
    (m.rowNumbers !== null && !Array.isArray(m.rowNumbers)) ||
    typeof m.saved !== 'string'
  )
    throw damaged('its list of contents is unreadable');
  const n = m.nRows as number;
  const per = m.rowsPerPiece as number;
  const pieceCount = Math.ceil(n / per);
  const fill = async (label: string, pieces: unknown, out: Float64Array | Int32Array) => {
    if (!Array.isArray(pieces) || pieces.length !== pieceCount)
      throw damaged(`${label} lists ${Array.isArray(pieces) ? pieces.length : 'no'} parts, not ${pieceCount}`);
    for (let k = 0; k < pieceCount; k++) {
      const expected = Math.min(n, (k + 1) * per) - k * per;
      const v = await get(String(pieces[k]));
      const where = `part ${k + 1} of ${pieceCount} of ${label}`;
      if (v === undefined || v === null) throw damaged(`${where} is missing`);
      if (v.constructor !== out.constructor) throw damaged(`${where} holds the wrong kind of values`);
      const got = v as Float64Array | Int32Array;
      if (got.length !== expected) throw damaged(`${where} holds ${got.length} values, not ${expected}`);
      out.set(got, k * per);
      await pause?.();
    }
  };
  const columns: Dataset['columns'] = [];
  for (const c of m.columns) {
    const label = `column "${String(c?.name)}"`;
    if (typeof c?.name !== 'string') throw damaged('a column has no name');
    if (c.kind === 'numeric') {
      const values = new Float64Array(n);
      await fill(label, c.pieces, values);
      columns.push({ kind: 'numeric', name: c.name, values });
    } else if (c.kind === 'categorical' && Array.isArray(c.levels) && c.levels.every((l) => typeof l === 'string')) {
      const codes = new Int32Array(n);
      await fill(label, c.pieces, codes);
      columns.push({ kind: 'categorical', name: c.name, codes, levels: c.levels });
    } else throw damaged(`${label} is of no known kind`);
  }
  const data: Dataset = { nRows: n, columns };
  if (m.firstRow !== undefined) data.firstRow = m.firstRow;
  if (m.rowNumbers) {
    data.rowNumbers = new Int32Array(n);
    await fill('the row numbers', m.rowNumbers, data.rowNumbers);
  }
  return { data, saved: m.saved };
}
