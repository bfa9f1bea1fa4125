/** Data back into the worker: a saved workspace (from this browser or a file), or the held copy after a crash. */
import type { Workspace } from '../../io/export/workspaceFile';
import * as A from '../actions';
import { dataIdOf, settingsFromWorkspace, summaryFromWorkspace } from '../workspace';
import type { EffectContext } from './context';
import { newDataId, type DataLoading } from './data';
import { requestOf, type Fitting } from './fitting';

export interface RestoreEffects {
  /** The worker crashed and was restarted empty: send it the data again and refit, or say what was lost. */
  recover(crashText: string): Promise<void>;
  /** Loads a saved workspace (its data into the worker, its settings into the store) and refits. */
  restoreWorkspace(
    ws: Workspace,
    origin: { kind: 'browser'; saved: string } | { kind: 'file'; name: string },
  ): Promise<void>;
  /** Reads a workspace file (.fulcra-workspace.json or .json.gz) and restores it. */
  openWorkspaceFile(file: Blob & { name: string }): Promise<void>;
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

export function restoring(ctx: EffectContext, data: DataLoading, fit: Pick<Fitting, 'fitWith'>): RestoreEffects {
  const { store, client, s, job } = ctx;
  let recovering = false;

  /** Puts a saved workspace's data into the worker and its settings into the store, then refits if it was fitted. */
  async function restore(ws: Workspace, notice: string): Promise<boolean> {
    if (!ws.data) {
      store.apply(A.notify, {
        kind: 'error',
        text: 'This workspace holds no data.',
        suggestion: 'Open your spreadsheet instead.',
      });
      return false;
    }
    const settings = settingsFromWorkspace(ws);
    const saved = ws.data;
    const summary = await job('Restoring the workspace', false, () =>
      client.call((api) => api.loadDataset(saved, summaryFromWorkspace(ws), ws.fileName ?? 'saved workspace')),
    );
    if (!summary) return false;
    store.apply(A.workspaceRestored, { summary, settings });
    data.setHeld({ id: dataIdOf(ws) ?? newDataId(), data: saved, summary });
    store.apply(A.notify, { kind: 'info', text: notice, action: 'start-afresh' });
    await data.refreshDropReport();
    const built = requestOf(s());
    if (settings.fitted && 'request' in built) await fit.fitWith(built.request, true);
    return true;
  }

  return {
    async recover(crashText) {
      const h = data.held();
      if (!h || recovering) {
        data.setHeld(null);
        store.apply(A.workerLost, crashText);
        return;
      }
      recovering = true;
      try {
        const summary = await client.call((api) => api.loadDataset(h.data, h.summary, h.summary.source.name));
        if (!summary) {
          data.setHeld(null);
          store.apply(A.workerLost, crashText);
          return;
        }
        const request = s().fit?.request ?? null;
        const refitted = request && (await fit.fitWith(request, true)) ? ' and the model was refitted' : '';
        const again = `Your data (${h.summary.source.name}) were loaded into it again${refitted}; nothing was lost.`;
        store.apply(A.notify, { kind: 'info', text: `${crashText} ${again}` });
      } finally {
        recovering = false;
      }
    },
    async restoreWorkspace(ws, origin) {
      await restore(
        ws,
        origin.kind === 'browser'
          ? `Restored your work from ${savedTime(origin.saved)}.`
          : `Opened the workspace ${origin.name}.`,
      );
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
      await restore({ ...ws, extra: { ...ws.extra, dataId: null } }, `Opened the workspace ${file.name}.`);
    },
  };
}
