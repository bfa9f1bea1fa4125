/**
 * Keeps the workspace in the browser (IndexedDB) so a closed tab loses nothing: the settings are saved
 * `delayMs` after the last change; the data once per load, by the worker, in pieces (src/io/export/keptData.ts),
 * so the page's thread never serialises them. On start the stored workspace is restored automatically (with a
 * "Start afresh" notice). When the browser will not keep the data, a notice says so plainly, says whether the
 * settings were kept, and offers the workspace file; after a reload without the data the start page says so too.
 */
import {
  clearWorkspaceInBrowser,
  idbBackend,
  loadWorkspaceFromBrowser,
  saveWorkspaceToBrowser,
  WORKSPACE_KEY,
  type KeyValueBackend,
} from '../io/export/persist';
import type { Workspace } from '../io/export/workspaceFile';
import * as A from './actions';
import type { Controller } from './controller';
import { savedTime } from './effects/restore';
import type { Store } from './store';
import { dataIdOf, settingsOf, toWorkspace, type HeldData } from './workspace';

/**
 * Key of the data as one record, as Fulcra kept them before the pieces: still read once (and then rewritten in
 * pieces and deleted), never written.
 */
export const DATA_KEY = `${WORKSPACE_KEY}:data`;

export interface Autosave {
  /** Restores the stored workspace, if any; true when something was restored. */
  restore(): Promise<boolean>;
  /** Starts watching the store; returns a function that stops. */
  start(): () => void;
  /** Saves now (e.g. when the tab is hidden) instead of waiting for the delay. */
  flush(): Promise<void>;
}

/** Why the data were not kept, as the end of a sentence ("…could not be kept in this browser: <reason>."). */
function reasonOf(code: string, message: string): string {
  if (code === 'storage-full') return 'the browser\u2019s storage for this page is full';
  if (code === 'storage-denied')
    return 'the browser does not allow this page to store data (private browsing or blocked site data)';
  if (code === 'storage-unavailable') return 'this browser has no storage for web pages (IndexedDB)';
  return `the browser refused them (${message})`;
}

const megabytes = (bytes: number) => `${Math.max(1, Math.round(bytes / 1e6)).toLocaleString('en-GB')} MB`;

function describe(held: HeldData, bytes: number): string {
  const { nRows, columns } = held.data;
  return (
    `${held.summary.source.name}: ${nRows.toLocaleString('en-GB')} rows \u00d7 ` +
    `${columns.length.toLocaleString('en-GB')} columns, ${megabytes(bytes)}`
  );
}

export function createAutosave(
  store: Store,
  ctl: Controller,
  options: { version: string; backend?: KeyValueBackend; delayMs?: number },
): Autosave {
  const backend = options.backend ?? idbBackend;
  const delay = options.delayMs ?? 1000;
  let savedDataId: string | null = null;
  /** Why the data of `savedDataId` could not be kept (null when they were). */
  let dataProblem: { code: string; what: string; why: string } | null = null;
  let storedSomething = false;
  /** Data restored from the old single record: written again in pieces as soon as watching starts. */
  let rewrite = false;
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

  /** Asks the worker to keep the held data (once per load); false when a newer load is on its way. */
  async function keep(held: HeldData): Promise<boolean> {
    const r = await ctl.keepData(held);
    if (!r) return true; // the engine stopped; the crash was reported, and its restart brings the data back
    if (r.kept) {
      savedDataId = held.id;
      dataProblem = null;
      await clearWorkspaceInBrowser({ backend, key: DATA_KEY }).catch(() => undefined);
      return true;
    }
    if (r.code === 'other-data') return false;
    savedDataId = held.id;
    dataProblem = { code: r.code, what: describe(held, r.bytes), why: reasonOf(r.code, r.message) };
    return true;
  }

  async function save(): Promise<void> {
    const s = store.get();
    const held = ctl.held();
    try {
      if (!s.data || !held) {
        if (storedSomething) {
          await clearWorkspaceInBrowser({ backend, key: WORKSPACE_KEY });
          await clearWorkspaceInBrowser({ backend, key: DATA_KEY });
          await ctl.forgetKeptData();
          storedSomething = false;
          savedDataId = null;
          dataProblem = null;
        }
        return;
      }
      const saved = new Date().toISOString();
      const fresh = held.id !== savedDataId;
      if (fresh && !(await keep(held))) return;
      const ws = toWorkspace(s, held, false);
      const record: Workspace = dataProblem
        ? {
            ...ws,
            extra: { ...ws.extra, dataKept: false, dataNotKept: { what: dataProblem.what, why: dataProblem.why } },
          }
        : ws;
      let settingsError: unknown = null;
      try {
        await saveWorkspaceToBrowser(record, options.version, { backend, key: WORKSPACE_KEY, saved });
        storedSomething = true;
      } catch (err) {
        settingsError = err;
      }
      if (dataProblem && fresh) {
        // One notice per load, saying what was and was not kept; the header no longer says "Kept here".
        store.apply(A.autosaved, null);
        const code = dataProblem.code;
        reported.add(code);
        store.apply(A.notify, {
          kind: 'error',
          code,
          text:
            `Your data (${dataProblem.what}) could not be kept in this browser: ${dataProblem.why}. ` +
            (settingsError
              ? 'The settings could not be kept either, so nothing of this work will come back after a reload.'
              : 'Only the settings were kept, and without the data your work will not come back after a reload.'),
          suggestion: 'Save the workspace as a file to keep the data and the settings together.',
          action: 'save-workspace',
        });
        return;
      }
      if (settingsError) throw settingsError;
      if (dataProblem) return;
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
      let settings;
      try {
        settings = await loadWorkspaceFromBrowser({ backend, key: WORKSPACE_KEY });
        if (!settings) return false;
      } catch (err) {
        report(err);
        return false;
      }
      storedSomething = true;
      const ws = settings.workspace;
      const when = savedTime(settings.saved);
      const name = ws.fileName ?? 'your data';
      const source = (ws.extra?.summary as { source?: { kind?: string } } | null | undefined)?.source;
      const notRestored = (why: string) =>
        store.apply(A.notify, {
          kind: 'warning',
          code: 'kept-data-missing',
          text: `Your work from ${when} could not be restored: ${why.charAt(0).toLowerCase()}${why.slice(1)}`,
          suggestion:
            source?.kind === 'demo'
              ? 'Start the invented example again, or open a workspace file if you saved one.'
              : `Open ${name} again, or a workspace file if you saved one.`,
        });
      if (ws.extra?.dataKept === false) {
        const not = ws.extra.dataNotKept as { what?: unknown; why?: unknown } | undefined;
        const what = typeof not?.what === 'string' ? ` (${not.what})` : '';
        const why = typeof not?.why === 'string' ? `: ${not.why}` : '';
        notRestored(`its data${what} could not be kept in this browser${why}. Only its settings were kept.`);
        return false;
      }
      const got = await ctl.restoreKept(ws, settings.saved);
      if (got === 'refused') return false;
      if (typeof got === 'object') {
        notRestored(got.problem);
        return false;
      }
      if (got === 'none') {
        // Kept by an older Fulcra as one record? Read it once; watching then writes it again in pieces.
        let data;
        try {
          data = await loadWorkspaceFromBrowser({ backend, key: DATA_KEY });
        } catch (err) {
          report(err);
          return false;
        }
        const id = dataIdOf(ws);
        if (!data?.workspace.data || id === null || dataIdOf(data.workspace) !== id) {
          notRestored(
            `its data (${name}) were not found in this browser\u2019s storage (the browser may have cleared them).`,
          );
          return false;
        }
        await ctl.restoreWorkspace(
          {
            ...ws,
            data: data.workspace.data,
            extra: { ...ws.extra, summary: data.workspace.extra?.summary ?? null },
          },
          { kind: 'browser', saved: settings.saved },
        );
        rewrite = ctl.held() !== null;
        savedDataId = null;
      } else savedDataId = ctl.held()?.id ?? null;
      if (ctl.held()) store.apply(A.autosaved, settings.saved);
      return ctl.held() !== null;
    },
    start() {
      lastKey = keyOf();
      const unsubscribe = store.subscribe(changed);
      ctl.onHeld(changed);
      if (rewrite) {
        rewrite = false;
        void enqueue();
      }
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
