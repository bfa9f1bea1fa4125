/**
 * Effects: each user intent calls the worker and feeds the answer back through a named action.
 * The client is injected (a WorkerClient in the page, a fake in tests).
 */
import type { DemoId } from '../engine/demo';
import type { WorkerClient } from '../ui/workerClient';
import type { ReportText } from '../worker/protocol';
import * as A from './actions';
import { importOptionsOf, type AppState, type ViewId } from './appState';
import type { Store } from './store';

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
  useRemedy(action: 'use-firth' | 'use-ridge' | 'reload'): Promise<void>;
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
}

let jobCounter = 0;
const newJobId = (kind: string) => `${kind}-${++jobCounter}`;

export function createController(store: Store, client: WorkerClient): Controller {
  const s = (): AppState => store.get();
  let lastFile: File | null = null;

  async function job<T>(label: string, cancellable: boolean, run: (jobId: string, onProgress: (d: number, t: number) => void) => Promise<T | undefined>): Promise<T | undefined> {
    const id = newJobId(label.split(' ')[0].toLowerCase());
    store.apply(A.jobStarted, { id, label, done: 0, total: 0, cancellable });
    const onProgress = client.progress((done: number, total: number) => store.apply(A.jobProgress, { id, done, total }));
    try {
      return await run(id, onProgress);
    } finally {
      store.apply(A.jobEnded, id);
    }
  }

  const afterFit = async () => {
    await refreshCosts();
    const first = s().fit?.fit.recipe.terms.find((t) => t.type !== 'interaction');
    if (first && 'column' in first) await riskCurve(first.column);
    await lossSurface(1, Math.min(2, (s().fit?.fit.coefficients.length ?? 2) - 1));
  };

  async function refreshCosts() {
    const costs = s().costs;
    if (!s().fit) return;
    const view = await client.latest('costs', (api) => api.costs(costs));
    if (!view) return;
    store.apply(A.costsDone, view);
    if (!s().thresholdView) {
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
    const request = { spec: built.spec, method, level, alpha, lambdaRule, profile: method === 'ml' || method === 'firth' };
    const view = await job('Fitting the model', method !== 'ml' && method !== 'firth', (id, onProgress) =>
      client.call((api) => api.fitModel(request, id, onProgress)));
    if (!view) return;
    store.apply(A.fitDone, view);
    if (s().view === 'data') store.apply(A.showView, 'model');
    await afterFit();
  }

  const self: Controller = {
    async startDemo(id) {
      const summary = await job('Generating the invented demo', false, () => client.call((api) => api.loadDemo(id)));
      if (!summary) return;
      store.apply(A.dataLoaded, summary);
      await fitModel();
    },
    async openFile(file) {
      if (lastFile !== file) store.apply(A.setImportSettings, { columnTypes: {}, sheet: null });
      lastFile = file;
      const bytes = await file.arrayBuffer();
      const options = importOptionsOf(s().importSettings);
      const summary = await job(`Reading ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.importFile(client.transfer(bytes, [bytes]), file.name, options, id, onProgress)));
      if (summary) store.apply(A.dataLoaded, summary);
    },
    async reread() {
      if (lastFile) await self.openFile(lastFile);
    },
    async pasteText(text) {
      const summary = await job('Reading pasted cells', true, (id, onProgress) =>
        client.call((api) => api.importText(text, importOptionsOf(s().importSettings), id, onProgress)));
      if (summary) store.apply(A.dataLoaded, summary);
    },
    async refreshDropReport() {
      const built = A.buildSpec(s());
      if ('problem' in built) { store.apply(A.dropReportDone, null); return; }
      const report = await client.latest('drop', (api) => api.dropReport(built.spec));
      if (report) store.apply(A.dropReportDone, report);
    },
    getRows: (start, count) => client.latest('rows', (api) => api.getRows(start, count)),
    fitModel,
    async fitImputed() {
      const f = s().fit;
      if (!f) return;
      const view = await job('Multiple imputation (10 datasets)', true, (id, onProgress) =>
        client.call((api) => api.fitImputed(f.request, id, onProgress)));
      if (view) store.apply(A.imputedDone, view);
    },
    async useRemedy(action) {
      if (action === 'reload') { store.apply(A.showView, 'data'); return; }
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
        client.call((api) => api.validate(replicates, id, onProgress)).then((v) => {
          if (v === undefined) cancelled = true;
          return v;
        }));
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
        client.call((api) => api.scoreBatch(client.transfer(bytes, [bytes]), file.name, s().threshold, id, onProgress)));
      if (view) store.apply(A.batchDone, view);
    },
    async externalValidate(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Validating on ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.externalValidate(client.transfer(bytes, [bytes]), file.name, id, onProgress)));
      if (view) store.apply(A.externalDone, view);
    },
    show: (view) => store.apply(A.showView, view),
    modelReport: (text) => job('Writing the model summary', false, () =>
      client.call((api) => api.modelReport(s().costs, s().threshold, new Date().toISOString(), text))),
    modelFile: (text) => client.call((api) => api.modelFile(s().costs, s().threshold, new Date().toISOString(), text)),
    pmml: () => client.call((api) => api.pmml(new Date().toISOString())),
  };
  return self;
}
