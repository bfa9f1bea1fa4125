import { beforeAll, describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import { createApi } from '../../src/worker/api';
import * as A from '../../src/state/actions';
import { initialState, type AppState } from '../../src/state/appState';
import {
  isMonitorStale,
  engineEmptied,
  modelClosed,
  modelOpened,
  monitorDone,
  monitorFileLoaded,
  monitorModelProblem,
  setMonitorSettings,
} from '../../src/state/monitorActions';
import type { MonitorFile } from '../../src/state/monitorState';
import type { OpenedModelView } from '../../src/worker/protocol';
import { monitoringRecord } from '../report/monitoringRecord';

const opened: OpenedModelView = {
  id: 7,
  fileName: 'ssi.fulcra-model.json',
  outcome: 'ssi_30d',
  event: 'yes',
  terms: ['age'],
  method: 'ml',
  created: '2026-12-01T10:00:00Z',
  fulcraVersion: '0.1.0',
  trainedOn: 'ssi.csv',
  trainingRows: 2000,
  purpose: null,
};
const file: MonitorFile = {
  id: 3,
  fileName: 'year2.csv',
  rows: 1200,
  notice: null,
  columns: [
    { name: 'op_date', type: 'date' },
    { name: 'ward', type: 'categorical' },
  ],
  dateCandidates: ['op_date'],
  unitCandidates: ['ward'],
  suggested: { dateColumn: 'op_date', unitColumn: 'ward' },
};
const { record } = monitoringRecord();
const initialMonitorSettings = () => ({ ...initialState.monitor.settings });

/** The page's state after the SSI demo was loaded and fitted by the real worker api, in-process. */
let demoState: AppState;
beforeAll(async () => {
  const api = createApi();
  const client: WorkerClient = {
    call: (run) => run(api as never),
    latest: (_key, run) => run(api as never),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: () => {},
    terminate: () => {},
    restart: () => {},
  };
  const store = createStore();
  await createController(store, client).startDemo('ssi');
  demoState = store.get();
}, 60_000);
const fitted = (): AppState => demoState;

describe('monitoring state', () => {
  it('an opened model file becomes the model that monitors; putting it away returns to the current fit', () => {
    let s = modelOpened(fitted(), opened);
    expect(s.openedModel?.fileName).toBe('ssi.fulcra-model.json');
    expect(s.monitor.settings.model).toBe('model-file');
    expect(monitorModelProblem(s)).toBeNull();
    s = modelClosed(s, undefined);
    expect(s.openedModel).toBeNull();
    expect(s.monitor.settings.model).toBe('current-fit');
    expect(setMonitorSettings(s, { model: 'model-file' })).toBe(s);
  });

  it('without a fit or a model file there is nothing to monitor with, and it says so', () => {
    expect(monitorModelProblem(initialState)).toMatch(/Fit a model, or open a model file/);
  });

  it('a monitoring file proposes its date and unit columns; a bad target run length is refused', () => {
    const s = monitorFileLoaded(fitted(), file);
    expect(s.monitor.settings.dateColumn).toBe('op_date');
    expect(s.monitor.settings.unitColumn).toBe('ward');
    expect(setMonitorSettings(s, { targetArl0: 3 })).toBe(s);
    expect(setMonitorSettings(s, { targetArl0: Number.NaN })).toBe(s);
    expect(setMonitorSettings(s, { targetArl0: 2000 }).monitor.settings.targetArl0).toBe(2000);
  });

  it('a result carries what it was computed for and goes out of date when the model, file or choices change', () => {
    const base = monitorFileLoaded(fitted(), file);
    const ranFor = { settings: base.monitor.settings, fit: base.fit, openedId: null, fileId: file.id };
    const s = monitorDone(base, { record, ranFor });
    expect(isMonitorStale(s)).toBe(false);
    expect(isMonitorStale(setMonitorSettings(s, { period: 'quarter' }))).toBe(true);
    expect(isMonitorStale(setMonitorSettings(s, { overdispersion: true }))).toBe(true);
    expect(isMonitorStale(A.setPredictor(s, { column: 'bmi', role: { include: false } }))).toBe(true);
    expect(isMonitorStale(monitorFileLoaded(s, { ...file, id: 4 }))).toBe(false); // a new file clears the result
    expect(monitorFileLoaded(s, { ...file, id: 4 }).monitor.result).toBeNull();
    expect(isMonitorStale({ ...s, fit: { ...s.fit! } })).toBe(true); // a new fit
    expect(isMonitorStale(modelOpened(s, opened))).toBe(true); // now the opened file monitors
  });

  it('a result computed with an opened model goes out of date when another model file is opened', () => {
    const base = modelOpened(monitorFileLoaded(fitted(), file), opened);
    const ranFor = { settings: base.monitor.settings, fit: base.fit, openedId: opened.id, fileId: file.id };
    const s = monitorDone(base, { record, ranFor });
    expect(isMonitorStale(s)).toBe(false);
    expect(isMonitorStale({ ...s, fit: null })).toBe(false); // the fit does not matter to a model file's result
    expect(isMonitorStale(modelOpened(s, { ...opened, id: 8 }))).toBe(true);
  });

  it('forgets the opened model and the monitoring file when the engine restarts empty (it no longer has them)', () => {
    const s = monitorDone(modelOpened(monitorFileLoaded(fitted(), file), opened), {
      record,
      ranFor: { settings: { ...initialMonitorSettings(), model: 'model-file' }, fit: null, openedId: 7, fileId: 3 },
    });
    const after = engineEmptied(s, undefined);
    expect(after.openedModel).toBeNull();
    expect(after.monitor.file).toBeNull();
    expect(after.monitor.result).toBeNull();
    expect(after.monitor.settings.model).toBe('current-fit');
    expect(engineEmptied(after, undefined)).toBe(after);
  });

  it('keeps the opened model and the monitoring file when new data are loaded', () => {
    const s = modelOpened(monitorFileLoaded(fitted(), file), opened);
    const summary = {
      source: { kind: 'file' as const, name: 'other.csv', notice: null },
      nRows: 1,
      columns: [],
      warnings: [],
      suggestedSpec: null,
      truth: null,
      format: null,
    };
    const after = A.dataLoaded(s, summary);
    expect(after.openedModel).toEqual(opened);
    expect(after.monitor.file).toEqual(file);
  });
});

describe('"Open model" in the worker', () => {
  it('reads a model file saved by the page, keeps it and names it, and refuses what is not one', async () => {
    const api = createApi();
    await api.loadDemo('ssi');
    await api.fitModel({ spec: demoState.fit!.request.spec }, 'fit-1');
    const text = await api.modelFile({ missedCase: 10, falseAlarm: 1 }, 0.1, '2026-12-04T04:00:00Z', {});
    const bytes = new TextEncoder().encode(text).buffer as ArrayBuffer;
    const view = await api.openModelFile(bytes, 'ssi.fulcra-model.json');
    expect(view).toMatchObject({ fileName: 'ssi.fulcra-model.json', outcome: 'ssi_30d', event: 'yes', method: 'ml' });
    expect(view.terms).toContain('asa_class');
    const bad = (b: ArrayBuffer, name: string) =>
      api.openModelFile(b, name).then(
        () => null,
        (e: { code: string; message: string }) => e,
      );
    const notJson = await bad(new TextEncoder().encode('age,ssi\n1,0\n').buffer as ArrayBuffer, 'data.csv');
    expect(notJson?.code).toBe('model-file-invalid');
    const broken = JSON.parse(text);
    broken.coefficients[1].estimate = 'high';
    const tampered = await bad(new TextEncoder().encode(JSON.stringify(broken)).buffer as ArrayBuffer, 'm.json');
    expect(tampered?.message).toContain('coefficients[1].estimate');
    const huge = await bad(new ArrayBuffer(21 * 1024 * 1024), 'huge.json');
    expect(huge?.message).toMatch(/21 MB; a Fulcra model file is a few kilobytes/);
    // the model file opened first is still the one kept
    await api.closeModelFile();
  }, 60_000);
});
