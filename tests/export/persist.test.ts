import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import {
  classifyStorageError,
  clearWorkspaceInBrowser,
  loadWorkspaceFromBrowser,
  PersistError,
  saveWorkspaceToBrowser,
  type KeyValueBackend,
} from '../../src/io/export/persist';
import type { Workspace } from '../../src/io/export/workspaceFile';

/** In-memory stand-in for IndexedDB: values go through structuredClone, as IndexedDB stores them. */
function memoryBackend(fail?: {
  on: 'get' | 'set' | 'del';
  error: unknown;
}): KeyValueBackend & { map: Map<string, unknown> } {
  const map = new Map<string, unknown>();
  const maybeFail = (op: 'get' | 'set' | 'del') => {
    if (fail && fail.on === op) throw fail.error;
  };
  return {
    map,
    get: async (k) => (maybeFail('get'), map.has(k) ? structuredClone(map.get(k)) : undefined),
    set: async (k, v) => (maybeFail('set'), void map.set(k, structuredClone(v))),
    del: async (k) => (maybeFail('del'), void map.delete(k)),
  };
}

const ws: Workspace = {
  fileName: 'ssi.csv',
  data: {
    nRows: 3,
    columns: [
      { kind: 'numeric', name: 'age', values: Float64Array.of(50, NaN, 71) },
      { kind: 'categorical', name: 'ssi', levels: ['no', 'yes'], codes: Int32Array.of(0, 1, -1) },
    ],
  },
  spec: { outcome: 'ssi', event: 'yes', terms: [{ type: 'main', column: 'age' }] },
  fitOptions: { method: 'ml' },
  seed: 1,
  threshold: 0.1,
  costs: { missedCase: 9, falseAlarm: 1 },
  freeText: { purpose: 'p' },
};

async function rejection(p: Promise<unknown>): Promise<FulcraError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(FulcraError);
    return e as FulcraError;
  }
  throw new Error('expected a rejection');
}

describe('persist (IndexedDB via idb-keyval)', () => {
  it('saves and restores the workspace with its typed arrays; null if none is stored; clear removes it', async () => {
    const backend = memoryBackend();
    expect(await loadWorkspaceFromBrowser({ backend })).toBeNull();
    await saveWorkspaceToBrowser(ws, '0.1.0', { backend, saved: '2026-12-02T02:00:00Z' });
    const back = await loadWorkspaceFromBrowser({ backend });
    expect(back).toEqual({ fulcraWorkspace: 1, fulcraVersion: '0.1.0', saved: '2026-12-02T02:00:00Z', workspace: ws });
    expect(back!.workspace.data!.columns[0]).toHaveProperty('values', expect.any(Float64Array));
    await clearWorkspaceInBrowser({ backend });
    expect(await loadWorkspaceFromBrowser({ backend })).toBeNull();
  });

  it('reports a full store (QuotaExceededError) as PersistError "storage-full", suggesting a file export', async () => {
    const e = await rejection(
      saveWorkspaceToBrowser(ws, '0.1.0', {
        backend: memoryBackend({ on: 'set', error: new DOMException('quota', 'QuotaExceededError') }),
      }),
    );
    expect(e).toBeInstanceOf(PersistError);
    expect(e.code).toBe('storage-full');
    expect(e.message).toMatch(/storage for this page is full/);
    expect(e.suggestion).toMatch(/Save the workspace as a file/);
  });

  it('reports denied storage (SecurityError, InvalidStateError) as "storage-denied"', async () => {
    for (const name of ['SecurityError', 'InvalidStateError']) {
      const e = await rejection(
        loadWorkspaceFromBrowser({ backend: memoryBackend({ on: 'get', error: new DOMException('no', name) }) }),
      );
      expect(e.code).toBe('storage-denied');
    }
  });

  it('reports a missing IndexedDB as "storage-unavailable" (the real idb-keyval in Node, which has none)', async () => {
    const e = await rejection(loadWorkspaceFromBrowser());
    expect(e.code).toBe('storage-unavailable');
    expect(classifyStorageError(new Error('boom')).code).toBe('storage-failed');
  });

  it('refuses a stored record of another schema version or with damaged columns', async () => {
    const backend = memoryBackend();
    backend.map.set('fulcra:workspace', { fulcraWorkspace: 9, fulcraVersion: '9', saved: 'x', workspace: {} });
    expect((await rejection(loadWorkspaceFromBrowser({ backend }))).code).toBe('workspace-file-version');
    backend.map.set('fulcra:workspace', {
      fulcraWorkspace: 1,
      fulcraVersion: '0.1.0',
      saved: 'x',
      workspace: { ...ws, data: { nRows: 3, columns: [{ kind: 'numeric', name: 'age', values: [1, 2, 3] }] } },
    });
    const e = await rejection(loadWorkspaceFromBrowser({ backend }));
    expect(e.code).toBe('workspace-file-invalid');
    expect(e.message).toMatch(/"workspace\.data\.columns\[0\]" is not a numeric \(Float64Array\)/);
  });
});
