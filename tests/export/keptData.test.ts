import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core';
import {
  forgetKeptData,
  KEPT_PREFIX,
  MANIFEST_KEY,
  readKeptData,
  ROWS_PER_PIECE,
  writeKeptData,
  type KeptManifest,
} from '../../src/io/export/keptData';
import type { KeyValueBackend } from '../../src/io/export/persist';
import { keepData, restoreKept } from '../../src/worker/keepOps';
import type { DataSummary } from '../../src/worker/protocol';
import { createSession } from '../../src/worker/session';

/** In-memory stand-in for IndexedDB: structured clone on the way in and out, as IndexedDB stores values. */
function memoryBackend(): KeyValueBackend & { map: Map<string, unknown>; order: string[] } {
  const map = new Map<string, unknown>();
  const order: string[] = [];
  return {
    map,
    order,
    get: async (k) => (map.has(k) ? structuredClone(map.get(k)) : undefined),
    set: async (k, v) => {
      order.push(k);
      map.set(k, structuredClone(v));
    },
    del: async (k) => void map.delete(k),
    keys: async () => [...map.keys()],
  };
}

/** 10 rows: a numeric column with NaN (missing) and -0, a categorical column, listed spreadsheet row numbers. */
function sample(): Dataset {
  const n = 10;
  return {
    nRows: n,
    firstRow: 2,
    rowNumbers: Int32Array.from({ length: n }, (_, i) => 2 + i + (i > 4 ? 3 : 0)),
    columns: [
      { kind: 'numeric', name: 'age', values: Float64Array.from({ length: n }, (_, i) => (i === 3 ? NaN : 40 + i)) },
      { kind: 'numeric', name: 'zero', values: Float64Array.from({ length: n }, (_, i) => (i === 0 ? -0 : i / 7)) },
      {
        kind: 'categorical',
        name: 'ward',
        levels: ['A', 'B', 'C'],
        codes: Int32Array.from({ length: n }, (_, i) => (i % 4) - 1),
      },
    ],
  };
}

const saved = '2026-12-04T15:00:00.000Z';

describe('data kept in the browser in pieces', () => {
  it('cuts every column into pieces of at most rowsPerPiece rows and reads back the same bits', async () => {
    const b = memoryBackend();
    const data = sample();
    const m = await writeKeptData(b, 'load-1', data, { saved, rowsPerPiece: 4 });
    expect(m.columns.map((c) => c.pieces.length)).toEqual([3, 3, 3]);
    expect(m.rowNumbers).toHaveLength(3);
    const lengths = m.columns[0].pieces.map((k) => (b.map.get(k) as Float64Array).length);
    expect(lengths).toEqual([4, 4, 2]);
    // Each piece is its own copy, not a view that would store the whole column's buffer.
    expect((b.map.get(m.columns[0].pieces[0]) as Float64Array).buffer.byteLength).toBe(32);
    // The manifest is written last, so a store cut short is never taken as complete.
    expect(b.order.at(-1)).toBe(MANIFEST_KEY);

    const back = await readKeptData(b, 'load-1');
    expect(back?.saved).toBe(saved);
    expect(back?.data).toEqual(data);
    expect(Object.is((back!.data.columns[1] as { values: Float64Array }).values[0], -0)).toBe(true);
  });

  it('uses 16 MB pieces by default: one piece for a column of fewer rows', async () => {
    expect(ROWS_PER_PIECE * 8).toBe(16 * 2 ** 20);
    const b = memoryBackend();
    const m = await writeKeptData(b, 'x', sample(), { saved });
    expect(m.columns.every((c) => c.pieces.length === 1)).toBe(true);
  });

  it('a missing piece is refused, naming the column and the piece', async () => {
    const b = memoryBackend();
    const m = await writeKeptData(b, 'load-1', sample(), { saved, rowsPerPiece: 4 });
    b.map.delete(m.columns[2].pieces[1]);
    await expect(readKeptData(b, 'load-1')).rejects.toMatchObject({
      code: 'kept-data-damaged',
      message: 'The data kept in this browser are incomplete (part 2 of 3 of column "ward" is missing).',
    });
  });

  it('a truncated piece, or one of the wrong kind, is refused', async () => {
    const b = memoryBackend();
    const m = await writeKeptData(b, 'load-1', sample(), { saved, rowsPerPiece: 4 });
    const key = m.columns[0].pieces[2];
    b.map.set(key, new Float64Array(1));
    await expect(readKeptData(b, 'load-1')).rejects.toThrow(/part 3 of 3 of column "age" holds 1 values, not 2/);
    b.map.set(key, new Int32Array(2));
    await expect(readKeptData(b, 'load-1')).rejects.toThrow(/part 3 of 3 of column "age" holds the wrong kind/);
    const rows = m.rowNumbers![0];
    b.map.set(key, new Float64Array(2));
    b.map.set(rows, new Int32Array(3));
    await expect(readKeptData(b, 'load-1')).rejects.toThrow(/part 1 of 3 of the row numbers holds 3 values, not 4/);
  });

  it('a manifest listing too few pieces (a longer column cut short) is refused', async () => {
    const b = memoryBackend();
    await writeKeptData(b, 'load-1', sample(), { saved, rowsPerPiece: 4 });
    const m = b.map.get(MANIFEST_KEY) as KeptManifest;
    m.columns[1].pieces.pop();
    await expect(readKeptData(b, 'load-1')).rejects.toThrow(/column "zero" lists 2 parts, not 3/);
  });

  it('a manifest of other data, or none, reads as nothing kept (not as these data)', async () => {
    const b = memoryBackend();
    expect(await readKeptData(b, 'load-1')).toBeNull();
    await writeKeptData(b, 'load-2', sample(), { saved });
    expect(await readKeptData(b, 'load-1')).toBeNull();
    expect(await readKeptData(b, 'load-2')).not.toBeNull();
  });

  it('new data replace the old: the old pieces are deleted, and so are stray pieces a closed tab left', async () => {
    const b = memoryBackend();
    const first = await writeKeptData(b, 'load-1', sample(), { saved, rowsPerPiece: 4 });
    b.map.set(`${KEPT_PREFIX}:load-0:c0:0`, new Float64Array(3));
    const second = await writeKeptData(b, 'load-2', sample(), { saved, rowsPerPiece: 4 });
    const stored = [...b.map.keys()].filter((k) => k.startsWith(`${KEPT_PREFIX}:`) && k !== MANIFEST_KEY);
    const listed = [...second.columns.flatMap((c) => c.pieces), ...second.rowNumbers!];
    expect(stored.sort()).toEqual(listed.sort());
    expect(first.columns[0].pieces.some((k) => b.map.has(k))).toBe(false);
    await forgetKeptData(b);
    expect([...b.map.keys()]).toEqual([]);
  });

  it('storage that refuses a piece rejects with a PersistError and leaves no half-written data', async () => {
    const b = memoryBackend();
    let writes = 0;
    const refusing: KeyValueBackend = {
      ...b,
      set: (k, v) =>
        ++writes > 4 ? Promise.reject(Object.assign(new Error('quota'), { name: 'QuotaExceededError' })) : b.set(k, v),
    };
    await expect(writeKeptData(refusing, 'load-1', sample(), { saved, rowsPerPiece: 4 })).rejects.toMatchObject({
      code: 'storage-full',
    });
    expect([...b.map.keys()]).toEqual([]);
    expect(await readKeptData(b, 'load-1')).toBeNull();
  });
});

describe('the worker keeps and restores its own data set', () => {
  const summaryOf = (d: Dataset, nRows = d.nRows) =>
    ({ nRows, columns: d.columns.map((c) => ({ name: c.name })) }) as unknown as DataSummary;

  it('writes only the data the page named, and restores them into the session', async () => {
    const b = memoryBackend();
    const s = createSession();
    s.data = sample();
    expect(await keepData(s, b, 'load-1', { nRows: 10, names: ['age', 'other', 'ward'] })).toMatchObject({
      kept: false,
      code: 'other-data',
    });
    expect(b.map.size).toBe(0);
    expect(await keepData(s, b, 'load-1', { nRows: 10, names: ['age', 'zero', 'ward'] })).toEqual({
      kept: true,
      bytes: 10 * 8 * 2 + 10 * 4 * 2,
    });
    const fresh = createSession();
    const got = await restoreKept(fresh, b, 'load-1', summaryOf(sample()), 'kept.csv');
    expect(got.status).toBe('restored');
    expect(fresh.data).toEqual(sample());
    expect(await restoreKept(createSession(), b, 'load-9', null, 'x')).toEqual({ status: 'none' });
  });

  it('refuses kept data that do not match the summary saved with the settings', async () => {
    const b = memoryBackend();
    const s = createSession();
    s.data = sample();
    await keepData(s, b, 'load-1', { nRows: 10, names: ['age', 'zero', 'ward'] });
    const fresh = createSession();
    const got = await restoreKept(fresh, b, 'load-1', summaryOf(sample(), 12), 'kept.csv');
    expect(got).toMatchObject({ status: 'damaged', message: expect.stringMatching(/\(12 rows, 3 columns\)\.$/) });
    expect(fresh.data).toBeNull();
  });
});
