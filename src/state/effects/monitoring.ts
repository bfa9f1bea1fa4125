/**
 * Monitoring later cases with a model (issue 15): "Open model" (a model file read in the worker), the monitoring
 * file or its invented demo, the monitoring run and the recalibration on the latest periods, and the two CSVs.
 * Files are read in the worker through the same path and memory guard as the main data input.
 */
import { monitoringSignalsCsv, monitoringUnitsCsv } from '../../io/export';
import { cautionSettingOf } from '../../report/cautions';
import * as A from '../actions';
import * as M from '../monitorActions';
import { nextSerial, type EffectContext } from './context';

export interface MonitoringEffects {
  /** Reads a Fulcra model file; it becomes the model that monitors (shown with its name, no refit). */
  openModel(file: File): Promise<void>;
  /** Puts the opened model away (monitoring goes back to the current fit). */
  closeModel(): Promise<void>;
  openMonitoringFile(file: File): Promise<void>;
  /** The invented second year of operations by ward (seeded, labelled invented), then a monitoring run. */
  monitoringDemo(): Promise<void>;
  /** Runs the monitoring with the current choices; the result carries what it was computed for. */
  monitor(): Promise<void>;
  /** Recalibrates the model on the latest periods of the result shown (intercept and slope recorded). */
  recalibrateOnPeriods(): Promise<void>;
  /** The unit table (null without units) and the signal list of the result shown, as CSV text. */
  monitoringCsv(which: 'units' | 'signals'): string | null;
  /** The monitoring report on its own (PDF, built in the worker); refused while the result is out of date. */
  monitoringReport(): Promise<Uint8Array | undefined>;
}

export function monitoring({ store, client, s, job }: EffectContext): MonitoringEffects {
  async function monitor() {
    const problem = M.monitorModelProblem(s());
    const { file, settings } = s().monitor;
    if (problem || !file || !settings.dateColumn) {
      store.apply(A.notify, {
        kind: 'error',
        text: problem ?? (file ? 'Choose the date column of the monitoring file.' : 'Open a monitoring file first.'),
      });
      return;
    }
    const ranFor = {
      settings,
      fit: s().fit,
      openedId: settings.model === 'model-file' ? (s().openedModel?.id ?? null) : null,
      fileId: file.id,
    };
    const options = {
      dateColumn: settings.dateColumn,
      unitColumn: settings.unitColumn,
      period: settings.period,
      targetArl0: settings.targetArl0,
      overdispersion: settings.overdispersion,
      level: s().level,
    };
    const record = await job('Monitoring with the model', false, () =>
      client.call((api) => api.monitor(options, settings.model)),
    );
    if (record) store.apply(M.monitorDone, { record, ranFor });
  }

  return {
    async openModel(file) {
      const bytes = await file.arrayBuffer();
      const view = await client.call((api) => api.openModelFile(client.transfer(bytes, [bytes]), file.name));
      if (!view) return;
      store.apply(M.modelOpened, view);
      store.apply(A.showView, 'monitor');
      store.apply(A.notify, {
        kind: 'info',
        text:
          `Opened the model "${file.name}" (risk of ${view.outcome} = ${view.event}); ` +
          'it is now the model that monitors.',
      });
    },
    async closeModel() {
      await client.call((api) => api.closeModelFile());
      store.apply(M.modelClosed, undefined);
    },
    async openMonitoringFile(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Reading ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.openMonitoringFile(client.transfer(bytes, [bytes]), file.name, id, onProgress)),
      );
      if (view) store.apply(M.monitorFileLoaded, { ...view, id: nextSerial() });
    },
    async monitoringDemo() {
      const view = await job('Generating the invented monitoring year', false, () =>
        client.call((api) => api.loadDemoMonitoring()),
      );
      if (!view) return;
      store.apply(M.monitorFileLoaded, { ...view, id: nextSerial() });
      if (!M.monitorModelProblem(s())) await monitor();
    },
    monitor,
    async recalibrateOnPeriods() {
      if (!s().monitor.result || M.isMonitorStale(s())) return;
      const n = s().monitor.recalPeriods;
      const r = await client.call((api) => api.recalibrateOnPeriods(n));
      if (r) store.apply(M.recalibrationDone, r);
    },
    async monitoringReport() {
      const r = s().monitor.result;
      if (!r) return undefined;
      if (M.isMonitorStale(s())) {
        store.apply(A.notify, {
          kind: 'error',
          text: 'The monitoring result is out of date (the model, file or choices changed): nothing was saved.',
          suggestion: 'Monitor again, then save the report.',
        });
        return undefined;
      }
      const monitoring = { record: r.record, recalibration: s().monitor.recalibration };
      const setting = cautionSettingOf(s().reportText.cautions);
      return job('Writing the monitoring report', false, () =>
        client.call((api) => api.monitoringReport(monitoring, new Date().toISOString(), setting)),
      );
    },
    monitoringCsv(which) {
      const r = s().monitor.result?.record;
      if (!r) return null;
      return which === 'units' ? monitoringUnitsCsv(r) : monitoringSignalsCsv(r);
    },
  };
}
