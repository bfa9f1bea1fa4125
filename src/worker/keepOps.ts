/**
 * Keeping the loaded data in this browser (IndexedDB, in pieces; src/io/export/keptData.ts) and reading them back,
 * here in the worker, which holds the data anyway: the page's thread never builds or clones the big record.
 * Both calls answer with a plain result instead of throwing, so the page words the notice itself.
 */
import { forgetKeptData, keptBytes, keptDataId, readKeptData, writeKeptData } from '../io/export/keptData';
import type { KeyValueBackend } from '../io/export/persist';
import { loadHeld } from './dataOps';
import type { DataSummary } from './protocol';
import { tick, type Session } from './session';

export type KeepResult =
  | { kept: true; bytes: number }
  | { kept: false; bytes: number; code: string; message: string }
  /** The worker holds other data than the page asked to keep (a newer load is on its way): nothing written. */
  | { kept: false; bytes: number; code: 'other-data'; message: string };

export type RestoreKeptResult =
  | { status: 'restored'; summary: DataSummary; saved: string }
  /** Nothing kept, or the kept data belong to another load. */
  | { status: 'none' }
  | { status: 'damaged' | 'failed'; code: string; message: string };

const failure = (err: unknown) => {
  const e = err as { code?: string; message?: string };
  return { code: e?.code ?? 'storage-failed', message: e?.message ?? String(err) };
};

/** Keeps the session's data under the page's `dataId` (skipped when that id is kept already). */
export async function keepData(
  s: Session,
  backend: KeyValueBackend,
  dataId: string,
  shape: { nRows: number; names: string[] },
): Promise<KeepResult> {
  const data = s.data;
  const bytes = data ? keptBytes(data) : 0;
  if (
    !data ||
    data.nRows !== shape.nRows ||
    data.columns.length !== shape.names.length ||
    data.columns.some((c, j) => c.name !== shape.names[j])
  )
    return { kept: false, bytes, code: 'other-data', message: 'The engine holds other data than the page.' };
  try {
    if ((await keptDataId(backend)) === dataId) return { kept: true, bytes };
    await writeKeptData(backend, dataId, data, { saved: new Date().toISOString(), pause: tick });
    return { kept: true, bytes };
  } catch (err) {
    return { kept: false, bytes, ...failure(err) };
  }
}

/**
 * Reads the data kept under `dataId` into the session (as a load does). `summary` is the one the page saved with
 * its settings; it must describe these data (rows and column names), or the kept data count as damaged.
 */
export async function restoreKept(
  s: Session,
  backend: KeyValueBackend,
  dataId: string,
  summary: DataSummary | null,
  name: string,
): Promise<RestoreKeptResult> {
  try {
    const kept = await readKeptData(backend, dataId, tick);
    if (!kept) return { status: 'none' };
    const cols = kept.data.columns;
    if (
      summary &&
      (summary.nRows !== kept.data.nRows ||
        summary.columns.length !== cols.length ||
        summary.columns.some((c, j) => c.name !== cols[j].name))
    )
      return {
        status: 'damaged',
        code: 'kept-data-damaged',
        message:
          `The data kept in this browser (${kept.data.nRows} rows, ${cols.length} columns) do not match the ` +
          `saved settings (${summary.nRows} rows, ${summary.columns.length} columns).`,
      };
    return { status: 'restored', summary: loadHeld(s, kept.data, summary, name), saved: kept.saved };
  } catch (err) {
    const f = failure(err);
    return { status: f.code === 'kept-data-damaged' ? 'damaged' : 'failed', ...f };
  }
}

/** Deletes the kept data ("Start afresh"); a storage failure is answered, not thrown. */
export async function forgetKept(backend: KeyValueBackend): Promise<{ forgotten: boolean; message?: string }> {
  try {
    await forgetKeptData(backend);
    return { forgotten: true };
  } catch (err) {
    return { forgotten: false, message: failure(err).message };
  }
}
