/**
 * Effects: each user intent calls the worker and feeds the answer back through a named action.
 * The client is injected (a WorkerClient in the page, a fake in tests).
 */
import type { DemoId } from '../engine/demo';
import type { WorkerClient } from '../bridge/workerClient';
import type { Workspace } from '../io/export/workspaceFile';
import type { FitRequest, ReportText } from '../worker/protocol';
import * as A from './actions';
import { importOptionsOf, type AppState, type ViewId } from './appState';
import type { Store } from './store';
import { dataIdOf, settingsFromWorkspace, summaryFromWorkspace, toWorkspace, type HeldData } from './workspace';

export interface Controller {
  startDemo(id: DemoId): Promise<void>;
  openFile(file: File): Promise<void>;
  /** Reads the last opened file again with the current import settings. */
  reread(): Promise<void>;
  pasteText(text: string): Promise<void>;
  getRows(start: number, count: number): Promise<string[][] | undefined>;
  refreshDropReport(): Promise<void>;
  fitModel(): Promise<void>;
  /** Refits the current model with multiple imputation of its missing values. */
  fitImputed(): Promise<void>;
  useRemedy(action: 'use-firth' | 'use-ridge' | 'reload' | 'start-afresh'): Promise<void>;
  queryThreshold(): Promise<void>;
  refreshCosts(): Promise<void>;
  riskCurve(predictor: string): Promise<void>;
  lossSurface(a: number, b: number): Promise<void>;
  validate(replicates: number): Promise<void>;
  cancel(jobId: string): void;
  scoreOne(values: Record<string, string | number | null>): Promise<void>;
  scoreBatch(file: File): Promise<void>;
  externalValidate(file: File): Promise<void>;
  show(view: ViewId): void;
  /** The model-summary PDF bytes of the current model (built in the worker). */
  modelReport(text: ReportText): Promise<Uint8Array | undefined>;
  /** The model file (JSON text) or PMML of the current model. */
  modelFile(text: ReportText): Promise<string | undefined>;
  pmml(): Promise<string | undefined>;
  /** The data loaded now, as fetched back from the worker after the load (null before any load). */
  held(): HeldData | null;
  /** Called with the new held data after every load (and with null on "Start afresh"). */
  onHeld(listener: (held: HeldData | null) => void): void;
  /** The worker crashed and was restarted empty: send it the data again and refit, or say what was lost. */
  recover(crashText: string): Promise<void>;
  /** Loads a saved workspace (its data into the worker, its settings into the store) and refits. */
  restoreWorkspace(
    ws: Workspace,
    origin: { kind: 'browser'; saved: string } | { kind: 'file'; name: string },
  ): Promise<void>;
  /** Reads a workspace file (.fulcra-workspace.json or .json.gz) and restores it. */
  openWorkspaceFile(file: Blob & { name: string }): Promise<void>;
  /** The whole workspace as a gzip file, with its suggested name; undefined when no data are loaded. */
  workspaceFile(version: string): Promise<{ bytes: Uint8Array; name: string } | undefined>;
  /** Forgets the data and every setting. */
  startAfresh(): void;
}

/** "2 Dec 2026, 02:41" — when a saved workspace was written, in the user's own clock. */
export function savedTime(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime())
    ? iso
    : d.toLocaleString('en-GB', {
        day: 'numeric',
        month: 'short',
        year: 'numeric',
        hour: '2-digit',
        minute: '2-digit',
      });
}

let jobCounter = 0;
const newJobId = (kind: string) => `${kind}-${++jobCounter}`;

export function createController(store: Store, client: WorkerClient): Controller {
  const s = (): AppState => store.get();
  let lastFile: File | null = null;
  let held: HeldData | null = null;
  let recovering = false;
  const heldListeners = new Set<(h: HeldData | null) => void>();
  const setHeld = (h: HeldData | null) => {
    held = h;
    for (const l of heldListeners) l(h);
  };
  /** Keeps a copy of the data just loaded in the worker (for saving and for a restart after a crash). */
  async function captureData() {
    const got = await client.call((api) => api.getDataset());
    setHeld(got ? { id: `${Date.now().toString(36)}-${++jobCounter}`, data: got.data, summary: got.summary } : null);
  }

  async function job<T>(
    label: string,
    cancellable: boolean,
    run: (jobId: string, onProgress: (d: number, t: number) => void) => Promise<T | undefined>,
  ): Promise<T | undefined> {
    const id = newJobId(label.split(' ')[0].toLowerCase());
    store.apply(A.jobStarted, { id, label, done: 0, total: 0, cancellable });
    const onProgress = client.progress((done: number, total: number) =>
      store.apply(A.jobProgress, { id, done, total }),
    );
    try {
      return await run(id, onProgress);
    } finally {
      store.apply(A.jobEnded, id);
    }
  }

  const afterFit = async (keepThreshold = false) => {
    await refreshCosts(keepThreshold);
    const first = s().fit?.fit.recipe.terms.find((t) => t.type !== 'interaction');
    if (first && 'column' in first) await riskCurve(first.column);
    await lossSurface(1, Math.min(2, (s().fit?.fit.coefficients.length ?? 2) - 1));
  };

  async function refreshCosts(keepThreshold = false) {
    const costs = s().costs;
    if (!s().fit) return;
    const view = await client.latest('costs', (api) => api.costs(costs));
    if (!view) return;
    store.apply(A.costsDone, view);
    if (!s().thresholdView && !keepThreshold) {
      const t = view.optimal.decisionTheory.threshold;
      store.apply(A.setThreshold, t);
    }
    await queryThreshold();
  }

  async function queryThreshold() {
    if (!s().fit) return;
    const { threshold, costs } = s();
    const view = await client.latest('threshold', (api) => api.threshold(threshold, costs));
    if (view) store.apply(A.thresholdDone, view);
  }

  async function riskCurve(predictor: string) {
    const view = await client.latest('risk', (api) => api.riskCurve(predictor));
    if (view) store.apply(A.riskCurveDone, view);
  }

  async function lossSurface(a: number, b: number) {
    if (!s().fit || a === b) return;
    const view = await client.latest('loss', (api) => api.lossSurface(a, b));
    if (view) store.apply(A.lossSurfaceDone, view);
  }

  async function fitModel() {
    const built = A.buildSpec(s());
    if ('problem' in built) {
      store.apply(A.notify, { kind: 'error', text: built.problem });
      return;
    }
    const { method, level, alpha, lambdaRule } = s();
    await fitWith(
      { spec: built.spec, method, level, alpha, lambdaRule, profile: method === 'ml' || method === 'firth' },
      false,
    );
  }

  /** Fits `request`; a restore or restart keeps the user's view and cut-off instead of moving to the model. */
  async function fitWith(request: FitRequest, keep: boolean): Promise<boolean> {
    const { method } = request;
    const view = await job('Fitting the model', method !== 'ml' && method !== 'firth', (id, onProgress) =>
      client.call((api) => api.fitModel(request, id, onProgress)),
    );
    if (!view) return false;
    store.apply(A.fitDone, view);
    if (!keep && s().view === 'data') store.apply(A.showView, 'model');
    await afterFit(keep);
    return true;
  }

  /** Puts a saved workspace's data into the worker and its settings into the store, then refits. */
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
    const data = ws.data;
    const summary = await job('Restoring the workspace', false, () =>
      client.call((api) => api.loadDataset(data, summaryFromWorkspace(ws), ws.fileName ?? 'saved workspace')),
    );
    if (!summary) return false;
    store.apply(A.workspaceRestored, { summary, settings });
    setHeld({ id: dataIdOf(ws) ?? `${Date.now().toString(36)}-${++jobCounter}`, data, summary });
    store.apply(A.notify, { kind: 'info', text: notice, action: 'start-afresh' });
    const built = A.buildSpec(s());
    if (settings.fitted && 'spec' in built) {
      const { method, level, alpha, lambdaRule } = s();
      await fitWith(
        { spec: built.spec, method, level, alpha, lambdaRule, profile: method === 'ml' || method === 'firth' },
        true,
      );
    }
    return true;
  }

  const self: Controller = {
    async startDemo(id) {
      const summary = await job('Generating the invented demo', false, () => client.call((api) => api.loadDemo(id)));
      if (!summary) return;
      store.apply(A.dataLoaded, summary);
      await captureData();
      await fitModel();
    },
    async openFile(file) {
      if (lastFile !== file) store.apply(A.setImportSettings, { columnTypes: {}, sheet: null });
      lastFile = file;
      const bytes = await file.arrayBuffer();
      const options = importOptionsOf(s().importSettings);
      const summary = await job(`Reading ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.importFile(client.transfer(bytes, [bytes]), file.name, options, id, onProgress)),
      );
      if (!summary) return;
      store.apply(A.dataLoaded, summary);
      await captureData();
    },
    async reread() {
      if (lastFile) await self.openFile(lastFile);
    },
    async pasteText(text) {
      const summary = await job('Reading pasted cells', true, (id, onProgress) =>
        client.call((api) => api.importText(text, importOptionsOf(s().importSettings), id, onProgress)),
      );
      if (!summary) return;
      store.apply(A.dataLoaded, summary);
      await captureData();
    },
    async refreshDropReport() {
      const built = A.buildSpec(s());
      if ('problem' in built) {
        store.apply(A.dropReportDone, null);
        return;
      }
      const report = await client.latest('drop', (api) => api.dropReport(built.spec));
      if (report) store.apply(A.dropReportDone, report);
    },
    getRows: (start, count) => client.latest('rows', (api) => api.getRows(start, count)),
    fitModel,
    async fitImputed() {
      const f = s().fit;
      if (!f) return;
      const view = await job('Multiple imputation (10 datasets)', true, (id, onProgress) =>
        client.call((api) => api.fitImputed(f.request, id, onProgress)),
      );
      if (view) store.apply(A.imputedDone, view);
    },
    async useRemedy(action) {
      if (action === 'reload') {
        store.apply(A.showView, 'data');
        return;
      }
      if (action === 'start-afresh') {
        self.startAfresh();
        return;
      }
      store.apply(A.chooseMethod, action === 'use-firth' ? 'firth' : 'ridge');
      await fitModel();
    },
    queryThreshold,
    refreshCosts,
    riskCurve,
    lossSurface,
    async validate(replicates) {
      store.apply(A.validationStarted, undefined);
      const firstNew = s().nextNoticeId;
      let cancelled = false;
      const view = await job(`Bootstrap validation (${replicates} resamples)`, true, (id, onProgress) =>
        client
          .call((api) => api.validate(replicates, id, onProgress))
          .then((v) => {
            if (v === undefined) cancelled = true;
            return v;
          }),
      );
      const failed = s().notices.some((n) => n.kind === 'error' && n.id >= firstNew);
      if (view) store.apply(A.validationDone, view);
      else if (failed) store.apply(A.validationFailed, undefined);
      else if (cancelled) store.apply(A.validationCancelled, undefined);
    },
    cancel: (jobId) => client.cancel(jobId),
    async scoreOne(values) {
      const view = await client.call((api) => api.scoreOne(values, s().threshold));
      if (view) store.apply(A.scoreDone, view);
    },
    async scoreBatch(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Scoring ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.scoreBatch(client.transfer(bytes, [bytes]), file.name, s().threshold, id, onProgress)),
      );
      if (view) store.apply(A.batchDone, view);
    },
    async externalValidate(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Validating on ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.externalValidate(client.transfer(bytes, [bytes]), file.name, id, onProgress)),
      );
      if (view) store.apply(A.externalDone, view);
    },
    show: (view) => store.apply(A.showView, view),
    modelReport: (text) =>
      job('Writing the model summary', false, () =>
        client.call((api) => api.modelReport(s().costs, s().threshold, new Date().toISOString(), text)),
      ),
    modelFile: (text) => client.call((api) => api.modelFile(s().costs, s().threshold, new Date().toISOString(), text)),
    pmml: () => client.call((api) => api.pmml(new Date().toISOString())),
    held: () => held,
    onHeld: (listener) => {
      heldListeners.add(listener);
    },
    async recover(crashText) {
      const h = held;
      if (!h || recovering) {
        setHeld(null);
        store.apply(A.workerLost, crashText);
        return;
      }
      recovering = true;
      try {
        const summary = await client.call((api) => api.loadDataset(h.data, h.summary, h.summary.source.name));
        if (!summary) {
          setHeld(null);
          store.apply(A.workerLost, crashText);
          return;
        }
        const request = s().fit?.request ?? null;
        const refitted = request && (await fitWith(request, true)) ? ' and the model was refitted' : '';
        store.apply(A.notify, {
          kind: 'info',
          text: `${crashText} Your data (${h.summary.source.name}) were loaded into it again${refitted}; nothing was lost.`,
        });
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
    async workspaceFile(version) {
      if (!held || !s().data) return undefined;
      const bytes = await client.call((api) => api.workspaceFile(toWorkspace(s(), held, false), version));
      if (!bytes) return undefined;
      const stem = (s().outcome ?? held.summary.source.name).replace(/[^\p{L}\p{N}_-]+/gu, '_').slice(0, 40) || 'data';
      return {
        bytes,
        name: `fulcra-workspace-${stem}-${new Date().toISOString().slice(0, 10)}.fulcra-workspace.json.gz`,
      };
    },
    startAfresh() {
      setHeld(null);
      store.apply(A.startAfresh, undefined);
    },
  };
  return self;
}
