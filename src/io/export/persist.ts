import { del, get, keys, set } from 'idb-keyval';
import { FulcraError, type Dataset } from '../../engine/core';
import { FieldChecker } from './validate';
import { checkWorkspaceFields, WORKSPACE_FILE_VERSION, type Workspace } from './workspaceFile';

export type PersistErrorCode = 'storage-full' | 'storage-denied' | 'storage-unavailable' | 'storage-failed';

/**
 * Why the browser's storage refused: 'storage-full' (QuotaExceededError), 'storage-denied' (SecurityError,
 * InvalidStateError — e.g. private browsing or blocked site data), 'storage-unavailable' (no IndexedDB) or
 * 'storage-failed' (anything else). The workbench can say so and still offer "Save workspace" as a file.
 */
export class PersistError extends FulcraError {
  constructor(
    override readonly code: PersistErrorCode,
    message: string,
    override readonly cause?: unknown,
  ) {
    super(code, message, 'Save the workspace as a file instead (Save workspace), so nothing is lost.');
    this.name = 'PersistError';
  }
}

/** The key-value backend: idb-keyval by default; tests pass an in-memory one. */
export interface KeyValueBackend {
  get(key: string): Promise<unknown>;
  set(key: string, value: unknown): Promise<void>;
  del(key: string): Promise<void>;
  /** Every stored key (used to sweep pieces of kept data a closed tab left half written); optional. */
  keys?(): Promise<string[]>;
}

export const idbBackend: KeyValueBackend = {
  get: (k) => get(k),
  set: (k, v) => set(k, v),
  del: (k) => del(k),
  keys: async () => (await keys()).filter((k): k is string => typeof k === 'string'),
};

export const WORKSPACE_KEY = 'fulcra:workspace';

/** The record kept in IndexedDB: the workspace as is (typed arrays are stored natively by structured clone). */
export interface StoredWorkspace {
  fulcraWorkspace: typeof WORKSPACE_FILE_VERSION;
  fulcraVersion: string;
  saved: string;
  workspace: Workspace;
}

/** Maps an IndexedDB / DOMException failure to a PersistError with a message for the user. */
export function classifyStorageError(e: unknown): PersistError {
  if (e instanceof PersistError) return e;
  const name = typeof e === 'object' && e !== null && 'name' in e ? String((e as { name: unknown }).name) : '';
  const inner =
    typeof e === 'object' && e !== null && 'inner' in e ? classifyStorageError((e as { inner: unknown }).inner) : null;
  if (name === 'QuotaExceededError' || inner?.code === 'storage-full') {
    return new PersistError(
      'storage-full',
      'The browser\u2019s storage for this page is full, so the workspace could not be kept for next time.',
      e,
    );
  }
  if (name === 'SecurityError' || name === 'InvalidStateError' || name === 'NotAllowedError') {
    return new PersistError(
      'storage-denied',
      'The browser does not allow this page to store data (private browsing or blocked site data), ' +
        'so the workspace could not be kept for next time.',
      e,
    );
  }
  if (name === 'ReferenceError' || (e instanceof Error && /indexedDB is not defined/.test(e.message))) {
    return new PersistError(
      'storage-unavailable',
      'This browser has no storage for web pages (IndexedDB), so the workspace cannot be kept for next time.',
      e,
    );
  }
  const detail = e instanceof Error ? e.message : String(e);
  return new PersistError(
    'storage-failed',
    `The workspace could not be stored in the browser (${name || 'error'}: ${detail}).`,
    e,
  );
}

/** Stores the workspace in IndexedDB under `key`. Rejects with a PersistError. */
export async function saveWorkspaceToBrowser(
  ws: Workspace,
  fulcraVersion: string,
  options: { key?: string; backend?: KeyValueBackend; saved?: string } = {},
): Promise<void> {
  const backend = options.backend ?? idbBackend;
  const record: StoredWorkspace = {
    fulcraWorkspace: WORKSPACE_FILE_VERSION,
    fulcraVersion,
    saved: options.saved ?? new Date().toISOString(),
    workspace: ws,
  };
  try {
    await backend.set(options.key ?? WORKSPACE_KEY, record);
  } catch (e) {
    throw classifyStorageError(e);
  }
}

/**
 * Restores the stored workspace, or null when none is stored. A stored record of another schema version or
 * with damaged fields rejects with FulcraError 'workspace-file-version' / 'workspace-file-invalid';
 * storage failures reject with a PersistError.
 */
export async function loadWorkspaceFromBrowser(
  options: { key?: string; backend?: KeyValueBackend } = {},
): Promise<StoredWorkspace | null> {
  const backend = options.backend ?? idbBackend;
  let raw: unknown;
  try {
    raw = await backend.get(options.key ?? WORKSPACE_KEY);
  } catch (e) {
    throw classifyStorageError(e);
  }
  if (raw === undefined || raw === null) return null;
  const c = new FieldChecker('workspace-file-invalid', 'stored workspace');
  const o = c.object(raw, '(record)');
  if (o.fulcraWorkspace !== WORKSPACE_FILE_VERSION) {
    throw new FulcraError(
      'workspace-file-version',
      `The workspace stored in this browser has schema version ${JSON.stringify(o.fulcraWorkspace)}; ` +
        `this Fulcra reads version ${WORKSPACE_FILE_VERSION}.`,
      'Start a new workspace; open a saved workspace file if you have one.',
    );
  }
  const w = c.object(o.workspace, 'workspace');
  return {
    fulcraWorkspace: WORKSPACE_FILE_VERSION,
    fulcraVersion: c.string(o.fulcraVersion, 'fulcraVersion'),
    saved: c.string(o.saved, 'saved'),
    workspace: checkWorkspaceFields(
      c,
      w,
      w.data === null || w.data === undefined ? null : checkStoredDataset(c, w.data),
    ),
  };
}

/** Removes the stored workspace. */
export async function clearWorkspaceInBrowser(
  options: { key?: string; backend?: KeyValueBackend } = {},
): Promise<void> {
  try {
    await (options.backend ?? idbBackend).del(options.key ?? WORKSPACE_KEY);
  } catch (e) {
    throw classifyStorageError(e);
  }
}

function checkStoredDataset(c: FieldChecker, v: unknown): Dataset {
  const d = c.object(v, 'workspace.data');
  const nRows = c.number(d.nRows, 'workspace.data.nRows');
  const columns = c.array(d.columns, 'workspace.data.columns').map((x, i) => {
    const col = c.object(x, `workspace.data.columns[${i}]`);
    const name = c.string(col.name, `workspace.data.columns[${i}].name`);
    if (col.kind === 'numeric' && col.values instanceof Float64Array && col.values.length === nRows)
      return { kind: 'numeric' as const, name, values: col.values };
    if (col.kind === 'categorical' && col.codes instanceof Int32Array && col.codes.length === nRows) {
      return {
        kind: 'categorical' as const,
        name,
        codes: col.codes,
        levels: c.stringArray(col.levels, `workspace.data.columns[${i}].levels`),
      };
    }
    return c.fail(
      `workspace.data.columns[${i}]`,
      'is not a numeric (Float64Array) or categorical (Int32Array) column of nRows values',
    );
  });
  return { nRows, columns };
}
