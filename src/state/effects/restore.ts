/** Data back into the worker: a saved workspace (from this browser or a file), or the held copy after a crash. */
import type { Workspace } from '../../io/export/workspaceFile';
import type { KeepResult, RestoreKeptResult } from '../../worker/keepOps';
import * as A from '../actions';
import { settingsFromWorkspace, type HeldData } from '../workspace';
import { checkWorkspace } from '../workspaceCheck';
import type { EffectContext } from './context';
import { newDataId, type DataLoading } from './data';
import { requestOf, type Fitting } from './fitting';

export interface RestoreEffects {
  /** The worker crashed and was restarted empty: send it the data again and refit, or say what was lost. */
  recover(crashText: string): Promise<void>;
  /**
   * Cancels a fit that does not yield (maximum likelihood, Firth: one synchronous run in the engine) by stopping
   * the engine and starting a fresh one with the data; the model shown before is refitted (cancelling that refit
   * too leaves no model, and every view says so).
   */
  cancelByRestart(): Promise<void>;
  /** Loads a saved workspace (its data into the worker, its settings into the store) and refits. */
  restoreWorkspace(
    ws: Workspace,
    origin: { kind: 'browser'; saved: string } | { kind: 'file'; name: string },
  ): Promise<void>;
  /** Reads a workspace file (.fulcra-workspace.json or .json.gz) and restores it. */
  openWorkspaceFile(file: Blob & { name: string }): Promise<void>;
  /** Asks the worker to keep the held data in this browser (it writes them in pieces); undefined if it crashed. */
  keepData(held: HeldData): Promise<KeepResult | undefined>;
  /** Deletes the data kept in this browser (the worker does it). */
  forgetKeptData(): Promise<void>;
  /**
   * Restores the work kept in this browser: `ws` is the settings record (no data); the worker reads the data it
   * kept under the record's data id. 'none': no data are kept for it; a problem: what is wrong, in plain words.
   */
  restoreKept(ws: Workspace, saved: string): Promise<'restored' | 'refused' | 'none' | { problem: string }>;
}

/** "2 Dec 2026, 02:41" — when a saved workspace was written, in the user's own clock. */
export function savedTime(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return d.toLocaleString('en-GB', {
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
  });
}

export function restoring(
  ctx: EffectContext,
  data: DataLoading,
  fit: Pick<Fitting, 'fitWith'>,
  refitKept: () => Promise<void> = async () => {},
): RestoreEffects {
  const { store, client, s, job } = ctx;
  let recovering = false;

  /**
   * Puts a saved workspace's data into the worker and its settings into the store, then refits what was fitted.
   * The whole workspace is checked first (workspaceCheck.ts): a bad one is refused, naming the field, before the
   * worker or the store change, so the work on the page (and the work kept in this browser) stays as it was.
   */
  async function restore(ws: Workspace, notice: string, kind: string): Promise<boolean> {
    if (!ws.data) {
      store.apply(A.notify, {
        kind: 'error',
        text: 'This workspace holds no data.',
        suggestion: 'Open your spreadsheet instead.',
      });
      return false;
    }
    const ok = check(ws, kind);
    if (!ok) return false;
    const saved = ws.data;
    const summary = await job('Restoring the workspace', false, () =>
      client.call((api) => api.loadDataset(saved, ok.checked.summary, ws.fileName ?? 'saved workspace')),
    );
    if (!summary) return false;
    await settle(ok.settings, { id: ok.checked.dataId ?? newDataId(), data: saved, summary }, notice);
    return true;
  }

  /** The workspace checked, or null (and a notice saying why) when it is refused. */
  function check(ws: Workspace, kind: string) {
    try {
      const checked = checkWorkspace(ws, kind);
      return { checked, settings: settingsFromWorkspace(ws, checked) };
    } catch (err) {
      const e = err as { message?: string; suggestion?: string };
      const kept = s().data ? ' Nothing was changed: the work on the page is as it was.' : '';
      store.apply(A.notify, { kind: 'error', text: `${e.message ?? String(err)}${kept}`, suggestion: e.suggestion });
      return null;
    }
  }

  /** The data are in the worker: the settings go into the store, the page keeps its copy, the model is refitted. */
  async function settle(settings: CheckedSettings, held: HeldData, notice: string): Promise<void> {
    const { summary } = held;
    store.apply(A.workspaceRestored, { summary, settings });
    data.setHeld(held);
    store.apply(A.notify, { kind: 'info', text: notice, action: 'start-afresh' });
    await data.refreshDropReport();
    // The model shown when the workspace was saved, even if the settings changed after it (it then shows as out
    // of date); workspaces saved before the fitted request was kept refit their settings.
    const built = requestOf(s());
    const request = settings.fittedRequest ?? (settings.fitted && 'request' in built ? built.request : null);
    if (request) await fit.fitWith(request, true);
    await refitKept(); // the other models kept in the workspace (modelsState.ts), then the shown one again
  }

  type CheckedSettings = ReturnType<typeof settingsFromWorkspace>;

  /** Counts refills: a newer one (the engine was restarted again meanwhile) takes over from an older one. */
  let generation = 0;
  /** A refill is refitting the model shown before: stopping that refit leaves no model. */
  let refitting = false;

  /**
   * The engine was restarted empty: puts the kept data into it again and refits the model shown (or, when it cannot,
   * clears the model so that no view shows results the engine no longer has). Resolves to the text that says so,
   * or null when a newer restart took over.
   */
  async function refill(refit: boolean): Promise<string | null> {
    const gen = ++generation;
    const h = data.held()!;
    const summary = await client.call((api) => api.loadDataset(h.data, h.summary, h.summary.source.name));
    if (gen !== generation) return null;
    if (!summary) {
      data.setHeld(null);
      return 'lost';
    }
    const shown = s().fit;
    const request = shown?.request ?? null;
    const again = `Your data (${h.summary.source.name}) were loaded into it again`;
    if (!request) return `${again}; nothing was lost.`;
    if (refit) {
      refitting = true;
      // The fit the page shows goes back into the engine as it is: no refit, the same numbers, seconds not minutes.
      const ok = await fit.fitWith(request, true, shown ?? undefined).finally(() => (refitting = false));
      if (gen !== generation) return null;
      if (ok) return `${again} and the model was restored; nothing was lost.`;
    }
    store.apply(A.fitLost, undefined);
    return `${again}; the model was not refitted, so no model is shown: fit it again.`;
  }

  return {
    async recover(crashText) {
      if (!data.held() || recovering) {
        data.setHeld(null);
        store.apply(A.workerLost, crashText);
        return;
      }
      recovering = true;
      try {
        const said = await refill(true);
        if (said === 'lost') store.apply(A.workerLost, crashText);
        else if (said) store.apply(A.notify, { kind: 'info', text: `${crashText} ${said}` });
      } finally {
        recovering = false;
      }
    },
    async cancelByRestart() {
      const second = refitting;
      client.restart();
      if (!data.held()) return;
      const said = await refill(!second);
      const text = 'The fit was cancelled: the engine was stopped and started afresh.';
      if (said === 'lost') store.apply(A.workerLost, text);
      else if (said) store.apply(A.notify, { kind: 'info', text: `${text} ${said}` });
    },
    async restoreWorkspace(ws, origin) {
      await restore(
        ws,
        origin.kind === 'browser'
          ? `Restored your work from ${savedTime(origin.saved)}.`
          : `Opened the workspace ${origin.name}.`,
        origin.kind === 'browser' ? 'stored workspace' : 'workspace file',
      );
    },
    keepData: (held) =>
      // Comlink's Remote splits a union result into a union of promises: named back as one.
      client.call<KeepResult>(
        (api) =>
          api.keepData(held.id, {
            nRows: held.data.nRows,
            names: held.data.columns.map((c) => c.name),
          }) as Promise<KeepResult>,
      ),
    async forgetKeptData() {
      const r = await client.call((api) => api.forgetKeptData());
      if (r && !r.forgotten)
        store.apply(A.notify, {
          kind: 'warning',
          text: `The data kept in this browser could not be deleted (${r.message ?? 'storage error'}).`,
          suggestion: 'Clear this site’s data in the browser’s settings to remove them.',
        });
    },
    async restoreKept(ws, savedAt) {
      const ok = check(ws, 'stored workspace');
      if (!ok) return 'refused';
      const id = ok.checked.dataId;
      if (id === null) return 'none';
      const name = ws.fileName ?? 'kept data';
      const got = await job('Restoring your work kept in this browser', false, () =>
        client.call<RestoreKeptResult>(
          (api) => api.restoreKeptData(id, ok.checked.summary, name) as Promise<RestoreKeptResult>,
        ),
      );
      if (!got) return 'refused'; // the failure was already reported through the worker client
      if (got.status === 'none') return 'none';
      if (got.status !== 'restored') return { problem: got.message };
      // The page keeps its own copy, as after any load (the engine may need it back after a crash).
      const copy = await client.call((api) => api.getDataset());
      if (!copy) return 'refused';
      await settle(
        ok.settings,
        { id, data: copy.data, summary: got.summary },
        `Restored your work from ${savedTime(savedAt)}.`,
      );
      return 'restored';
    },
    async openWorkspaceFile(file) {
      let ws: Workspace;
      try {
        const bytes = new Uint8Array(await file.arrayBuffer());
        const read = await client.call((api) => api.readWorkspaceFile(client.transfer(bytes, [bytes.buffer])));
        if (!read) return; // the failure was already reported through the worker client
        ws = read;
      } catch (err) {
        const e = err as { message?: string; suggestion?: string };
        store.apply(A.notify, { kind: 'error', text: e.message ?? String(err), suggestion: e.suggestion });
        return;
      }
      // A workspace from a file is a new load: it gets its own id, so this browser keeps its data too.
      await restore(
        { ...ws, extra: { ...ws.extra, dataId: null } },
        `Opened the workspace ${file.name}.`,
        'workspace file',
      );
    },
  };
}
