/**
 * The worker's api: the only place the engine and the importer run for the page. Holds the loaded data and the
 * current model; every call returns plain records. Errors leave as plain {code, message, suggestion} objects
 * (Comlink would drop an Error's extra fields); cancellation raises code 'cancelled'.
 */
import { readWorkspaceBytes, workspaceToGzip, type Workspace } from '../io/export/workspaceFile';
import * as Comlink from 'comlink';
import type { DemoId } from '../engine/demo';
import type { ModelSpec } from '../engine/core';
import type { ImportOptions } from '../io/types';
import { missingReport } from '../engine/imputation';
import { installRowShards, messageShards, portOf, type ShardPort } from '../engine/numerics';
import { installPartReaders, messagePartReaders, type PartEndpoint } from '../io/parallelParse';
import { costView, thresholdAt } from './cutoffOps';
import { heldCopy, loadDemo, loadHeld, loadImported } from './dataOps';
import type { Dataset } from '../engine/core';
import { readBytes, readPasted } from './ioOps';
import { guardIncoming } from './budget';
import { forgetKept, keepData, restoreKept, type KeepResult, type RestoreKeptResult } from './keepOps';
import { idbBackend, type KeyValueBackend } from '../io/export/persist';
import { fitWithImputation } from './imputeOps';
import { fitModel } from './modelOps';
import { diagnosticsView } from './diagnosticsOps';
import { compareKeptModels, forgetModels, keepFittedModel, showKeptModel, type KeptKey } from './compareOps';
import { subgroupChoiceOf, subgroupsView } from './subgroupOps';
import type { SubgroupChoice } from '../engine/workflow';
import { rowsWindow } from './profile';
import type {
  Costs,
  CutoffOrigin,
  DataSummary,
  FitRequest,
  LossSurfaceChoice,
  Progress,
  ReportRequestText,
  ReportText,
} from './protocol';
import { createSession, openJob, requireData, requireRecord, tick, type Session } from './session';
import { closeModelFile, openModelFile } from './modelFileOps';
import { loadDemoMonitoring, monitor, openMonitoringFile, recalibrateMonitored } from './monitorOps';
import type { MonitoringOptionsInput } from '../engine/monitoring';
import type { PointsOptions } from '../engine/points';
import type { FitStep, MonitoringModel } from '../engine/workflow';
import type { MonitoringReport } from '../report/reportSectionMonitoring';
import { buildMonitoringReport } from '../report/buildMonitoringReport';
import type { CautionSetting } from '../report/cautions';
import { FULCRA_VERSION } from '../report/version';
import { modelFileText, modelReport, pmmlText } from './reportOps';
import { scoreImported, scoreOne } from './scoreOps';
import { riskCurve } from './shapeOps';
import { buildPoints, currentPoints, pointsCardPdf } from './pointsOps';
import { externalValidate, lossSurface, validate } from './validateOps';

async function guarded<T>(
  session: Session,
  jobId: string | null,
  run: () => Promise<T> | T,
  ready: Promise<unknown>,
): Promise<T> {
  try {
    await ready; // the row pool (if any) is installed before any design is built, so designs go to shared memory
    return await run();
  } catch (err) {
    const e = err as { code?: string; message?: string; suggestion?: string };
    throw { code: e?.code ?? 'internal', message: e?.message ?? String(err), suggestion: e?.suggestion };
  } finally {
    if (jobId) session.signals.delete(jobId);
  }
}

/** The bytes, once the one memory guard (guardIncoming) has let them in. */
function checkedBytes(bytes: ArrayBuffer, name: string, held: Session['data']): ArrayBuffer {
  guardIncoming(bytes, name, held);
  return bytes;
}

/**
 * The calls the page can make; one session (data set + current model) per api. `pool` resolves when the row pool
 * of the engine worker is started (to its number of threads); `storage` keeps the data in this browser (IndexedDB;
 * tests pass an in-memory one).
 */
export function createApi(pool: Promise<number> = Promise.resolve(1), storage: KeyValueBackend = idbBackend) {
  const session = createSession();
  let typical: Record<string, string | number> = {};
  const ready = pool.catch(() => 1);
  const guard = <T>(jobId: string | null, run: () => Promise<T> | T) => guarded(session, jobId, run, ready);
  const hooksFor = (jobId: string, onProgress?: Progress) => ({
    signal: openJob(session, jobId),
    tick,
    onProgress: onProgress ? (done: number, total: number) => void onProgress(done, total) : undefined,
  });
  return {
    /**
     * Helper threads the page started for this worker (without cross-origin isolation, so without the row pool):
     * one MessagePort to each. Profile limits and term tests then share their passes with them (rowShards.ts).
     * Resolves to the threads they give (1: not used, because the row pool runs).
     */
    attachShards: async (ports: MessagePort[]) => {
      if ((await ready) !== 1 || ports.length === 0) {
        for (const port of ports) port.close();
        return 1;
      }
      // each port carries the shards' passes and the parts of a large file to read (src/io/parallelParse.ts)
      const endpoints = ports.map((port) => {
        const shard = portOf(port),
          handlers: ((data: unknown) => void)[] = [];
        shard.listen((data) => {
          for (const h of handlers) h(data);
        });
        const endpoint: ShardPort & PartEndpoint = {
          postMessage: shard.postMessage,
          listen: (f) => void handlers.push(f),
          onReply: (f) => void handlers.push(f),
        };
        return endpoint;
      });
      const shards = messageShards(endpoints);
      installRowShards(shards);
      installPartReaders(messagePartReaders(endpoints));
      return shards.threads;
    },
    loadDemo: (id: DemoId) => guard(null, () => loadDemo(session, id)),
    importFile: (bytes: ArrayBuffer, name: string, options: ImportOptions, jobId: string, onProgress?: Progress) => {
      const h = hooksFor(jobId, onProgress);
      return guard(jobId, async () =>
        loadImported(
          session,
          await readBytes(checkedBytes(bytes, name, session.data), name, options, {
            signal: h.signal,
            tick,
            onProgress: onProgress ? (f) => void onProgress(Math.round(f * 100), 100) : undefined,
          }),
          'file',
          name,
        ),
      );
    },
    importText: (text: string, options: ImportOptions, jobId: string, onProgress?: Progress) => {
      const h = hooksFor(jobId, onProgress);
      return guard(jobId, async () =>
        loadImported(
          session,
          await readPasted((guardIncoming(text, 'pasted cells', session.data), text), options, {
            signal: h.signal,
            tick,
          }),
          'paste',
          'pasted cells',
        ),
      );
    },
    /** The loaded data and its summary (copies, transferred), for the page to keep and save; null when none. */
    getDataset: () =>
      guard(null, () => {
        const held = heldCopy(session);
        return held ? Comlink.transfer({ data: held.data, summary: held.summary }, held.buffers) : null;
      }),
    /** Loads data the page kept (engine restart, saved workspace) without reading a file again. */
    loadDataset: (data: Dataset, summary: DataSummary | null, name: string) =>
      guard(null, () => loadHeld(session, data, summary, name)),
    /** Keeps the loaded data in this browser, in pieces, for the page's `dataId` (see keepOps.ts); never throws. */
    keepData: (dataId: string, shape: { nRows: number; names: string[] }) =>
      guard<KeepResult>(null, () => keepData(session, storage, dataId, shape)),
    /** Loads the data kept in this browser under `dataId` into the session; answers 'none' when none are kept. */
    restoreKeptData: (dataId: string, summary: DataSummary | null, name: string) =>
      guard<RestoreKeptResult>(null, () => restoreKept(session, storage, dataId, summary, name)),
    /** Deletes the data kept in this browser ("Start afresh"). */
    forgetKeptData: () => guard(null, () => forgetKept(storage)),
    /** The workspace file (gzip JSON), encoded here, not on the page: `ws` comes without data, the worker adds it. */
    workspaceFile: (ws: Workspace, version: string) =>
      guard(null, async () => {
        const bytes = await workspaceToGzip({ ...ws, data: requireData(session) }, { fulcraVersion: version });
        return Comlink.transfer(bytes, [bytes.buffer as ArrayBuffer]);
      }),
    /** Decodes a workspace file (plain or gzip) here rather than on the page; its data buffers are transferred. */
    readWorkspaceFile: (bytes: Uint8Array) =>
      guard(null, async () => {
        guardIncoming(bytes, 'workspace file', session.data, 'workspace');
        const { workspace } = await readWorkspaceBytes(bytes);
        return Comlink.transfer(
          workspace,
          workspace.data
            ? [
                ...new Set(
                  workspace.data.columns.map(
                    (c) => (c.kind === 'numeric' ? c.values.buffer : c.codes.buffer) as ArrayBuffer,
                  ),
                ),
              ]
            : [],
        );
      }),
    /** Test hook (the page calls it only with ?testhooks=1): an uncaught error in the worker, as a crash raises. */
    crashForTest: () => {
      setTimeout(() => {
        throw new Error('engine crash requested by a test');
      }, 0);
    },
    getRows: (start: number, count: number) => guard(null, () => rowsWindow(requireData(session), start, count)),
    dropReport: (spec: ModelSpec) => guard(null, () => missingReport(requireData(session), spec)),
    /** Fits `req`; with `fitted` (the fit it gave before an engine restart) only what follows the fit is run. */
    fitModel: (req: FitRequest, jobId: string, onProgress?: Progress, fitted?: FitStep) =>
      guard(jobId, async () => {
        const view = await fitModel(session, req, hooksFor(jobId, onProgress), fitted);
        typical = view.typical;
        return { ...view, modelKey: keepFittedModel(session, view.typical) };
      }),
    /** Shows a kept model again (no refit): false when the engine no longer holds it. */
    showKeptModel: (key: number) =>
      guard(null, () => {
        const kept = showKeptModel(session, key);
        if (kept) typical = kept;
        return kept !== null;
      }),
    forgetModels: (keys: number[]) => guard(null, () => forgetModels(session, keys)),
    /** Two kept models compared at the page's cut-off and costs (workflow/compareStep), kept for the PDF. */
    compareModels: (a: KeptKey, b: KeptKey, threshold: number, costs: Costs) =>
      guard(null, () => compareKeptModels(session, a, b, threshold, costs)),
    /** The current analysis record (request, fit, evaluation, sample size, validations), as `npm run fit --json`. */
    analysisRecord: () => guard(null, () => requireRecord(session)),
    /** Leverage, residuals and influence of the current fit: the record's summary and the plots' per-row points. */
    diagnostics: () =>
      guard(null, () => {
        const v = diagnosticsView(session);
        const p = v.points;
        const arrays = [
          p.sheetRow,
          p.dataRow,
          p.y,
          p.residual,
          ...(p.leverage ? [p.leverage] : []),
          ...(p.cooks ? [p.cooks] : []),
        ];
        return Comlink.transfer(
          v,
          arrays.map((a) => a.buffer as ArrayBuffer),
        );
      }),
    /** Performance of the current fit by subgroup of one column (workflow/subgroupStep); kept for the PDF. */
    subgroups: (choice: SubgroupChoice) => guard(null, () => subgroupsView(session, choice)),
    /** The subgroup choice last computed for the current fit, or null. */
    subgroupChoice: () => guard(null, () => subgroupChoiceOf(session)),
    fitImputed: (req: FitRequest, jobId: string, onProgress?: Progress) =>
      guard(jobId, () => fitWithImputation(session, req, hooksFor(jobId, onProgress))),
    threshold: (t: number, costs: Costs) => guard(null, () => thresholdAt(session, t, costs)),
    costs: (costs: Costs) => guard(null, () => costView(session, costs)),
    riskCurve: (predictor: string) => guard(null, () => riskCurve(session, predictor, typical)),
    lossSurface: (a: number, b: number, choice?: LossSurfaceChoice) =>
      guard(null, () => lossSurface(session, a, b, choice)),
    validate: (replicates: number, jobId: string, onProgress?: Progress) =>
      guard(jobId, () => validate(session, replicates, hooksFor(jobId, onProgress))),
    scoreOne: (values: Record<string, string | number | null>, threshold: number) =>
      guard(null, () => scoreOne(session, values, threshold)),
    scoreBatch: (bytes: ArrayBuffer, name: string, threshold: number, jobId: string, onProgress?: Progress) => {
      const h = hooksFor(jobId, onProgress);
      return guard(jobId, async () =>
        scoreImported(
          session,
          await readBytes(checkedBytes(bytes, name, session.data), name, {}, { signal: h.signal, tick }),
          threshold,
        ),
      );
    },
    externalValidate: (bytes: ArrayBuffer, name: string, jobId: string, onProgress?: Progress) => {
      const h = hooksFor(jobId, onProgress);
      return guard(jobId, async () =>
        externalValidate(
          session,
          await readBytes(checkedBytes(bytes, name, session.data), name, {}, { signal: h.signal, tick }),
        ),
      );
    },
    modelReport: (
      costs: Costs,
      threshold: number,
      created: string,
      text: ReportRequestText,
      origin?: CutoffOrigin,
      monitoring?: MonitoringReport,
    ) =>
      guard(null, () => {
        const bytes = modelReport(session, costs, threshold, created, text, origin, monitoring);
        return Comlink.transfer(bytes, [bytes.buffer]);
      }),
    modelFile: (costs: Costs, threshold: number, created: string, text: ReportText) =>
      guard(null, () => modelFileText(session, costs, threshold, created, text)),
    pmml: (created: string) => guard(null, () => pmmlText(session, created)),
    /** The bedside points score of the current fit (kept for the PDF and the model file), and its card as a PDF. */
    pointsScore: (options: Partial<PointsOptions>) => guard(null, () => buildPoints(session, options)),
    /** The points score built for the current fit (the page restores its view from it), or null. */
    currentPoints: () => guard(null, () => currentPoints(session) ?? null),
    pointsCard: (created: string) =>
      guard(null, () => {
        const bytes = pointsCardPdf(session, created);
        return Comlink.transfer(bytes, [bytes.buffer as ArrayBuffer]);
      }),
    /** "Open model": reads and keeps a Fulcra model file beside the current fit (for monitoring with it). */
    openModelFile: (bytes: ArrayBuffer, name: string) => guard(null, () => openModelFile(session, bytes, name)),
    closeModelFile: () => guard(null, () => closeModelFile(session)),
    /** Reads and keeps a monitoring file (later cases with outcome and date); returns its columns for the choice. */
    openMonitoringFile: (bytes: ArrayBuffer, name: string, jobId: string, onProgress?: Progress) => {
      const h = hooksFor(jobId, onProgress);
      return guard(jobId, async () =>
        openMonitoringFile(
          session,
          await readBytes(checkedBytes(bytes, name, session.data), name, {}, { signal: h.signal, tick }),
          name,
        ),
      );
    },
    /** Keeps the invented second year of operations by ward as the monitoring file. */
    loadDemoMonitoring: () => guard(null, () => loadDemoMonitoring(session)),
    /** Monitors the kept file with the current fit or the opened model file: the one MonitoringRecord. */
    monitor: (options: MonitoringOptionsInput, source: MonitoringModel['source']) =>
      guard(null, () => monitor(session, options, source)),
    /** Intercept and slope recalibration on the latest `periods` periods of the last monitoring run. */
    recalibrateOnPeriods: (periods: number) => guard(null, () => recalibrateMonitored(session, periods)),
    /** The monitoring report on its own (PDF bytes, transferred), for the result the page shows. */
    monitoringReport: (monitoring: MonitoringReport, created: string, setting: CautionSetting) =>
      guard(null, () => {
        const bytes = buildMonitoringReport({
          monitoring,
          meta: { fulcraVersion: FULCRA_VERSION, created },
          cautionSetting: setting,
        });
        return Comlink.transfer(bytes, [bytes.buffer]);
      }),
    cancel: (jobId: string) => {
      const s = session.signals.get(jobId);
      if (s) s.aborted = true;
    },
  };
}

export type FulcraApi = ReturnType<typeof createApi>;
