/**
 * Keeps the workspace in the browser (IndexedDB) so a closed tab loses nothing: the settings are saved
 * `delayMs` after the last change; the data only once per load, under a key of their own. On start the stored
 * workspace is restored automatically (with a "Start afresh" notice). Storage failures go to the one notice list
 * with the suggestion to save the workspace as a file instead.
 */
import {
  clearWorkspaceInBrowser,
  idbBackend,
  loadWorkspaceFromBrowser,
  saveWorkspaceToBrowser,
  WORKSPACE_KEY,
  type KeyValueBackend,
} from '../io/export/persist';
import * as A from './actions';
import type { Controller } from './controller';
import type { Store } from './store';
import { dataIdOf, settingsOf, toWorkspace } from './workspace';

/** Key of the data record (the settings record uses WORKSPACE_KEY). */
export const DATA_KEY = `${WORKSPACE_KEY}:data`;

export interface Autosave {
  /** Restores the stored workspace, if any; true when something was restored. */
  restore(): Promise<boolean>;
  /** Starts watching the store; returns a function that stops. */
  start(): () => void;
  /** Saves now (e.g. when the tab is hidden) instead of waiting for the delay. */
  flush(): Promise<void>;
}

export function createAutosave(
  store: Store,
  ctl: Controller,
  options: { version: string; backend?: KeyValueBackend; delayMs?: number },
): Autosave {
  const backend = options.backend ?? idbBackend;
  const delay = options.delayMs ?? 1000;
  let savedDataId: string | null = null;
  let storedSomething = false;
  let lastKey: unknown[] = [];
  let timer: ReturnType<typeof setTimeout> | null = null;
  let chain: Promise<void> = Promise.resolve();
  const reported = new Set<string>();

  const report = (err: unknown) => {
    const e = err as { code?: string; message?: string; suggestion?: string };
    const code = e?.code ?? 'storage-failed';
    if (reported.has(code)) return;
    reported.add(code);
    store.apply(A.notify, { kind: 'error', text: e?.message ?? String(err), suggestion: e?.suggestion, code });
  };

  async function save(): Promise<void> {
    const s = store.get();
    const held = ctl.held();
    try {
      if (!s.data || !held) {
        if (storedSomething) {
          await clearWorkspaceInBrowser({ backend, key: WORKSPACE_KEY });
          await clearWorkspaceInBrowser({ backend, key: DATA_KEY });
          storedSomething = false;
          savedDataId = null;
        }
        return;
      }
      const saved = new Date().toISOString();
      if (held.id !== savedDataId) {
        await saveWorkspaceToBrowser(toWorkspace(s, held, true), options.version, { backend, key: DATA_KEY, saved });
        savedDataId = held.id;
      }
      await saveWorkspaceToBrowser(toWorkspace(s, held, false), options.version, {
        backend,
        key: WORKSPACE_KEY,
        saved,
      });
      storedSomething = true;
      reported.clear();
      store.apply(A.autosaved, saved);
    } catch (err) {
      report(err);
    }
  }

  const enqueue = () => {
    chain = chain.then(save);
    return chain;
  };

  /** What a save depends on; state changes are immutable, so comparing references is enough (cheap on every tick). */
  const keyOf = (): unknown[] => {
    const { view: _view, ...settings } = settingsOf(store.get());
    return [ctl.held()?.id ?? null, store.get().data, ...Object.values(settings)];
  };

  const changed = () => {
    const key = keyOf();
    if (key.length === lastKey.length && key.every((v, i) => Object.is(v, lastKey[i]))) return;
    lastKey = key;
    if (timer) clearTimeout(timer);
    // Forgetting the data is never delayed: "Start afresh" then reload must not bring them back.
    if (!store.get().data) {
      timer = null;
      void enqueue();
      return;
    }
    timer = setTimeout(() => {
      timer = null;
      void enqueue();
    }, delay);
  };

  return {
    async restore() {
      let settings, data;
      try {
        settings = await loadWorkspaceFromBrowser({ backend, key: WORKSPACE_KEY });
        if (!settings) return false;
        data = await loadWorkspaceFromBrowser({ backend, key: DATA_KEY });
      } catch (err) {
        report(err);
        return false;
      }
      storedSomething = true;
      const id = dataIdOf(settings.workspace);
      if (!data?.workspace.data || id === null || dataIdOf(data.workspace) !== id) {
        store.apply(A.notify, {
          kind: 'warning',
          text: 'The work kept in this browser was incomplete (its data were missing), so it could not be restored.',
          suggestion: 'Open your file again, or a saved workspace file.',
        });
        return false;
      }
      await ctl.restoreWorkspace(
        {
          ...settings.workspace,
          data: data.workspace.data,
          extra: { ...settings.workspace.extra, summary: data.workspace.extra?.summary ?? null },
        },
        { kind: 'browser', saved: settings.saved },
      );
      savedDataId = ctl.held()?.id ?? null;
      if (ctl.held()) store.apply(A.autosaved, settings.saved);
      return ctl.held() !== null;
    },
    start() {
      lastKey = keyOf();
      const unsubscribe = store.subscribe(changed);
      ctl.onHeld(changed);
      return () => {
        unsubscribe();
        if (timer) clearTimeout(timer);
      };
    },
    flush() {
      if (timer) {
        clearTimeout(timer);
        timer = null;
      }
      return enqueue();
    },
  };
}
