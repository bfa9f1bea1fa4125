import { describe, expect, it } from 'vitest';
import { createAutosave, DATA_KEY } from '../../src/state/autosave';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import * as A from '../../src/state/actions';
import { initialState } from '../../src/state/appState';
import { saveWorkspaceToBrowser, WORKSPACE_KEY, type KeyValueBackend } from '../../src/io/export/persist';
import { KEPT_PREFIX, MANIFEST_KEY, type KeptManifest } from '../../src/io/export/keptData';
import type { WorkerClient } from '../../src/bridge/workerClient';
import { createApi } from '../../src/worker/api';
import { settingsFromWorkspace, toWorkspace } from '../../src/state/workspace';
import type { DataSummary } from '../../src/worker/protocol';

/**
 * The page's controller on the real worker api in-process. `crash()` does what the page's WorkerClient does
 * when the worker dies: the old api is gone, a new EMPTY one takes its place, and the controller is told.
 */
function harness(storage: KeyValueBackend = memoryBackend()) {
  let api = createApi(undefined, storage);
  const errors: string[] = [];
  const store = createStore();
  // As the page wires createWorkerClient: a failure other than a cancellation goes to the one notice list.
  const report = (e: unknown) => {
    const err = e as { code?: string; message?: string; suggestion?: string };
    if (err.code !== 'cancelled') {
      errors.push(err.message ?? String(e));
      store.apply(A.notify, { kind: 'error', text: err.message ?? String(e), suggestion: err.suggestion });
    }
    return undefined;
  };
  const client: WorkerClient = {
    call: (run) => run(api as never).catch(report),
    latest: (_key, run) => run(api as never).catch(report),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: (id) => {
      void api.cancel(id);
    },
    restart: () => {},
    terminate: () => {},
  };
  const ctl = createController(store, client);
  const crash = async () => {
    api = createApi(undefined, storage);
    await ctl.recover('The calculation engine stopped unexpectedly and was restarted.');
  };
  return { store, ctl, errors, crash, api: () => api };
}

/** In-memory stand-in for IndexedDB (structured clone, as IndexedDB stores values); counts writes per key. */
function memoryBackend(
  failSet?: unknown,
): KeyValueBackend & { map: Map<string, unknown>; writes: Map<string, number> } {
  const map = new Map<string, unknown>();
  const writes = new Map<string, number>();
  return {
    map,
    writes,
    get: async (k) => (map.has(k) ? structuredClone(map.get(k)) : undefined),
    set: async (k, v) => {
      if (failSet) throw failSet;
      writes.set(k, (writes.get(k) ?? 0) + 1);
      map.set(k, structuredClone(v));
    },
    del: async (k) => void map.delete(k),
  };
}

const estimates = (s: ReturnType<typeof createStore>) => s.get().fit?.fit.coefficients.map((c) => c.estimate) ?? [];

describe('engine crash containment', () => {
  it('after a crash the restarted engine gets the data back and the model is refitted to the same fit', async () => {
    const { store, ctl, crash, errors } = harness();
    await ctl.startDemo('ssi');
    store.apply(A.setThreshold, 0.2);
    await ctl.queryThreshold();
    const before = estimates(store);
    await crash();
    const s = store.get();
    expect(errors).toEqual([]);
    expect(s.data?.nRows).toBe(2000);
    expect(estimates(store)).toEqual(before);
    expect(s.threshold).toBe(0.2);
    expect(s.thresholdView?.metrics.threshold).toBe(0.2);
    expect(s.notices.map((n) => n.text)).toContain(
      'The calculation engine stopped unexpectedly and was restarted. ' +
        `Your data (${s.data!.source.name}) were loaded into it again and the model was restored; nothing was lost.`,
    );
    // The new engine really holds the data: it answers a row query.
    expect((await ctl.getRows(0, 2))?.cells).toHaveLength(2);
  });

  it('a crash before any data were loaded says so and offers a way back', async () => {
    const { store, crash } = harness();
    await crash();
    expect(store.get().notices[0]).toMatchObject({ kind: 'error', action: 'reload' });
  });

  it('pasted data survive a crash too (kept from the worker, not re-read)', async () => {
    const { store, ctl, crash } = harness();
    await ctl.pasteText('age\tinfected\n50\tno\n61\tyes\n70\tyes\n45\tno\n');
    await crash();
    expect(store.get().data?.nRows).toBe(4);
    expect((await ctl.getRows(0, 1))?.cells[0]).toContain('50');
  });
});

describe('workspace kept in the browser', () => {
  async function setUp(backend: KeyValueBackend) {
    const h = harness(backend);
    const autosave = createAutosave(h.store, h.ctl, { version: 'test', backend, delayMs: 5 });
    const stop = autosave.start();
    await h.ctl.startDemo('ssi');
    h.store.apply(A.setPredictor, { column: 'smoker', role: { include: false } });
    h.store.apply(A.chooseMethod, 'lasso');
    h.store.apply(A.setLambdaRule, 'min');
    h.store.apply(A.setMaxIter, 200);
    await h.ctl.fitModel();
    h.store.apply(A.setCosts, { missedCase: 20, falseAlarm: 2 });
    await h.ctl.refreshCosts();
    h.store.apply(A.setThreshold, 0.15);
    h.store.apply(A.setReportText, { purpose: 'Flag patients for wound review' });
    await autosave.flush();
    return { ...h, autosave, stop };
  }

  it('restores data, roles, method and λ rule, cut-off, costs and words after a reload, and refits', async () => {
    const backend = memoryBackend();
    const first = await setUp(backend);
    first.stop();
    const then = first.store.get();

    const page = harness(backend);
    const restored = await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore();
    const s = page.store.get();
    expect(restored).toBe(true);
    expect(page.errors).toEqual([]);
    expect(s.data?.nRows).toBe(2000);
    expect(s.roles).toEqual(then.roles);
    expect(s.roles.smoker.include).toBe(false);
    expect([s.outcome, s.event, s.method, s.lambdaRule]).toEqual([then.outcome, then.event, 'lasso', 'min']);
    expect([s.maxIter, s.fit?.request.maxIter]).toEqual([200, 200]);
    expect(s.costs).toEqual({ missedCase: 20, falseAlarm: 2 });
    expect(s.threshold).toBe(0.15);
    expect(s.thresholdView?.metrics.threshold).toBe(0.15);
    expect(s.reportText).toEqual({ purpose: 'Flag patients for wound review', cautions: 'clinical' });
    expect(s.fit?.request).toEqual(then.fit?.request);
    expect(estimates(page.store)).toEqual(estimates(first.store));
    const notice = s.notices.find((n) => n.text.startsWith('Restored your work from'));
    expect(notice?.action).toBe('start-afresh');
    expect(s.savedAt).toBe(then.savedAt);
  });

  it('writes the data once per load (in pieces, by the worker), the settings on every change', async () => {
    const backend = memoryBackend();
    const h = await setUp(backend);
    h.store.apply(A.setReportText, { setting: 'Two wards, 2025' });
    await h.autosave.flush();
    h.store.apply(A.setReportText, { population: 'Adults' });
    await h.autosave.flush();
    expect(backend.writes.get(MANIFEST_KEY)).toBe(1);
    expect(backend.writes.has(DATA_KEY)).toBe(false);
    expect(backend.writes.get(WORKSPACE_KEY)).toBeGreaterThanOrEqual(3);
    const settings = backend.map.get(WORKSPACE_KEY) as { workspace: { data: unknown; extra: { dataId: string } } };
    expect(settings.workspace.data).toBeNull();
    const manifest = backend.map.get(MANIFEST_KEY) as KeptManifest;
    expect(manifest.dataId).toBe(settings.workspace.extra.dataId);
    const firstPieces = manifest.columns.flatMap((c) => c.pieces);
    expect(firstPieces.every((k) => backend.map.has(k))).toBe(true);
    await h.ctl.startDemo('seals');
    await h.autosave.flush();
    expect(backend.writes.get(MANIFEST_KEY)).toBe(2);
    // The pieces of the first load are deleted when the data change.
    expect(firstPieces.some((k) => backend.map.has(k))).toBe(false);
    h.stop();
  });

  it('data kept by an older Fulcra as one record are restored once and then kept in pieces', async () => {
    const backend = memoryBackend();
    const first = await setUp(backend);
    first.stop();
    const held = first.ctl.held()!;
    // What the older autosave wrote: the whole workspace with its data under DATA_KEY, no manifest.
    const settings = backend.map.get(WORKSPACE_KEY) as { saved: string };
    await saveWorkspaceToBrowser(toWorkspace(first.store.get(), held, true), 'old', {
      backend,
      key: DATA_KEY,
      saved: settings.saved,
    });
    for (const k of [...backend.map.keys()]) if (k.startsWith(KEPT_PREFIX)) backend.map.delete(k);

    const page = harness(backend);
    const autosave = createAutosave(page.store, page.ctl, { version: 'test', backend, delayMs: 5 });
    expect(await autosave.restore()).toBe(true);
    expect(page.store.get().data?.nRows).toBe(2000);
    expect(estimates(page.store)).toEqual(estimates(first.store));
    const stop = autosave.start();
    await autosave.flush();
    expect(backend.map.has(DATA_KEY)).toBe(false);
    expect((backend.map.get(MANIFEST_KEY) as KeptManifest).dataId).toBe(held.id);
    stop();
  });

  it('says so on a reload when the kept data are gone, instead of starting empty in silence', async () => {
    const backend = memoryBackend();
    const first = await setUp(backend);
    first.stop();
    const manifest = backend.map.get(MANIFEST_KEY) as KeptManifest;
    backend.map.delete(manifest.columns[2].pieces[0]);
    const page = harness(backend);
    expect(await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore()).toBe(false);
    const n = page.store.get().notices.find((x) => x.code === 'kept-data-missing');
    expect(n?.text).toMatch(/^Your work from .* could not be restored: the data kept in this browser are incomplete/);
    expect(n?.suggestion).toBe('Start the invented example again, or open a workspace file if you saved one.');
    expect(n?.text).toContain(`part 1 of 1 of column "${manifest.columns[2].name}" is missing`);
    expect(page.store.get().data).toBeNull();

    backend.map.delete(MANIFEST_KEY);
    const again = harness(backend);
    expect(await createAutosave(again.store, again.ctl, { version: 'test', backend }).restore()).toBe(false);
    expect(again.store.get().notices.find((x) => x.code === 'kept-data-missing')?.text).toMatch(
      /its data \(.*\) were not found in this browser’s storage/,
    );
  });

  it('data the browser refuses: a plain notice, the settings kept, the file offered, the reload says so', async () => {
    const backend = memoryBackend();
    // Storage takes the settings but refuses every piece of data, as Chromium refused the 404 MB record.
    const refusing: KeyValueBackend = {
      ...backend,
      set: (k, v) =>
        k.startsWith(KEPT_PREFIX)
          ? Promise.reject(Object.assign(new Error('quota'), { name: 'QuotaExceededError' }))
          : backend.set(k, v),
    };
    const h = harness(refusing);
    const autosave = createAutosave(h.store, h.ctl, { version: 'test', backend: refusing, delayMs: 5 });
    const stop = autosave.start();
    h.store.apply(A.autosaved, '2026-12-04T10:00:00Z'); // "Kept here" from an earlier load must not stay
    await h.ctl.startDemo('ssi');
    await autosave.flush();
    h.store.apply(A.setReportText, { notes: 'more' });
    await autosave.flush();
    stop();
    const notices = h.store.get().notices.filter((n) => n.code === 'storage-full');
    expect(notices).toHaveLength(1);
    expect(notices[0].text).toMatch(
      /^Your data \(.*: 2,000 rows × \d+ columns, \d+ MB\) could not be kept in this browser: /,
    );
    expect(notices[0].text).toContain(
      'the browser’s storage for this page is full. Only the settings were kept, and without the data your work ' +
        'will not come back after a reload.',
    );
    expect(notices[0].action).toBe('save-workspace');
    expect(h.store.get().savedAt).toBeNull();
    expect([...backend.map.keys()].filter((k) => k.startsWith(KEPT_PREFIX))).toEqual([]);

    const page = harness(backend);
    expect(await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore()).toBe(false);
    const missing = page.store.get().notices.find((n) => n.code === 'kept-data-missing')?.text;
    expect(missing).toMatch(
      /could not be restored: its data \(.*: 2,000 rows × \d+ columns, \d+ MB\) could not be kept/,
    );
    expect(missing).toContain(
      'in this browser: the browser’s storage for this page is full. Only its settings were kept.',
    );
  });

  it('"Start afresh" forgets the stored work, so a reload starts empty', async () => {
    const backend = memoryBackend();
    const h = await setUp(backend);
    await h.ctl.useRemedy('start-afresh');
    await h.autosave.flush();
    expect(h.store.get().data).toBeNull();
    expect(backend.map.size).toBe(0);
    const page = harness(backend);
    expect(await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore()).toBe(false);
    h.stop();
  });

  it('full storage gives one notice that suggests the workspace file, and the file still round-trips', async () => {
    const full = Object.assign(new Error('quota'), { name: 'QuotaExceededError' });
    const h = await setUp(memoryBackend(full));
    h.store.apply(A.setReportText, { notes: 'x' });
    await h.autosave.flush();
    const storage = h.store.get().notices.filter((n) => n.code === 'storage-full');
    expect(storage).toHaveLength(1);
    expect(storage[0].suggestion).toMatch(/Save the workspace as a file/);

    const file = await h.ctl.workspaceFile('test');
    expect(file?.name).toMatch(/\.fulcra-workspace\.json\.gz$/);
    expect([file!.bytes[0], file!.bytes[1]]).toEqual([0x1f, 0x8b]);
    const other = harness();
    await other.ctl.openWorkspaceFile(Object.assign(new Blob([new Uint8Array(file!.bytes)]), { name: file!.name }));
    expect(other.errors).toEqual([]);
    expect(estimates(other.store)).toEqual(estimates(h.store));
    expect(other.store.get().reportText).toEqual(h.store.get().reportText);
    expect(other.store.get().threshold).toBe(0.15);
    h.stop();
  });

  it('a file that is not a workspace is refused in the notice list', async () => {
    const h = harness();
    await h.ctl.openWorkspaceFile(Object.assign(new Blob(['{"fulcraModel": 1}']), { name: 'model.json' }));
    expect(h.store.get().notices[0]).toMatchObject({ kind: 'error' });
    expect(h.store.get().notices[0].text).toMatch(/not a Fulcra workspace file/);
    expect(h.store.get().data).toBeNull();
  });
});

describe('settings of a saved workspace', () => {
  const empty = {
    fileName: null,
    data: null,
    seed: null,
    threshold: null,
    spec: null,
    costs: null,
    freeText: {},
  };
  const workbench = { roles: {}, interactions: [], costs: { missedCase: 5, falseAlarm: 1 }, method: 'firth' };

  it('keeps the iteration limit; a workspace saved before there was one opens with 50', () => {
    const s = { ...createStore().get(), maxIter: 300 };
    expect(settingsFromWorkspace(toWorkspace(s, null, false)).maxIter).toBe(300);
    expect(toWorkspace(s, null, false).fitOptions.maxIter).toBe(300);
    expect(settingsFromWorkspace({ ...empty, fitOptions: {}, extra: { workbench } }).maxIter).toBe(50);
    expect(settingsFromWorkspace({ ...empty, fitOptions: {} }).maxIter).toBe(50);
    // Written by another tool: FitOptions.maxIter is read when the engine would accept it.
    expect(settingsFromWorkspace({ ...empty, fitOptions: { maxIter: 120 } }).maxIter).toBe(120);
    // An invalid limit is refused, naming the field (workspaceCheck.ts), not silently replaced.
    expect(() => settingsFromWorkspace({ ...empty, fitOptions: { maxIter: 2.5 } })).toThrow(
      /"workspace\.fitOptions\.maxIter" must be a whole number from 1 to 10000/,
    );
    expect(() =>
      settingsFromWorkspace({ ...empty, fitOptions: {}, extra: { workbench: { ...workbench, maxIter: 0 } } }),
    ).toThrow(/"workspace\.extra\.workbench\.maxIter"/);
  });

  it('a workspace saved when elastic net was called "elasticnet" opens with the method "elastic-net"', () => {
    const workbench = { roles: {}, interactions: [], costs: { missedCase: 5, falseAlarm: 1 }, method: 'elasticnet' };
    const w = settingsFromWorkspace({
      fileName: null,
      data: null,
      seed: null,
      threshold: null,
      spec: null,
      fitOptions: {},
      costs: null,
      freeText: {},
      extra: { workbench },
    });
    expect(w.method).toBe('elastic-net');
    expect(w.costs).toEqual({ missedCase: 5, falseAlarm: 1 });
  });

  it('a workspace without Fulcra’s extra record gets its roles, method, cut-off, costs and words from the spec', () => {
    const w = settingsFromWorkspace({
      fileName: 'audit.csv',
      data: null,
      seed: null,
      threshold: 0.2,
      spec: {
        outcome: 'ssi',
        event: 'yes',
        terms: [
          { type: 'main', column: 'asa', reference: 'I' },
          { type: 'spline', column: 'age', knots: 4 },
          { type: 'interaction', columns: ['asa', 'age'] },
        ],
      },
      fitOptions: { method: 'firth', level: 0.9 },
      costs: { missedCase: 12, falseAlarm: 3 },
      freeText: { purpose: 'audit' },
    });
    expect(w.roles).toEqual({
      asa: { include: true, reference: 'I', knots: 0 },
      age: { include: true, reference: null, knots: 4 },
    });
    expect(w.interactions).toEqual([['asa', 'age']]);
    expect([w.outcome, w.event, w.method, w.level, w.threshold]).toEqual(['ssi', 'yes', 'firth', 0.9, 0.2]);
    expect(w.costs).toEqual({ missedCase: 12, falseAlarm: 3 });
    expect(w.reportText).toEqual({ purpose: 'audit' });
    expect(w.fitted).toBe(true);
  });

  it('keeps how the cut-off was set and whether the costs were the user’s; missing: unknown, invalid: refused', () => {
    const costs5 = A.setCosts(createStore().get(), { missedCase: 5 });
    const s = A.chooseCutoff(costs5, { threshold: 1 / 6, how: 'cost-based' });
    // As the file and IndexedDB keep it: plain JSON.
    const ws = JSON.parse(JSON.stringify(toWorkspace(s, null, false)));
    expect(settingsFromWorkspace(ws)).toMatchObject({
      costs: { missedCase: 5, falseAlarm: 1 },
      threshold: 1 / 6,
      cutoffHow: 'cost-based',
      costsSetByUser: true,
    });
    const summary = { source: { kind: 'file', name: 'a.csv', notice: null }, nRows: 1, columns: [], warnings: [] };
    const back = A.workspaceRestored(initialState, { summary: summary as never, settings: settingsFromWorkspace(ws) });
    expect(back).toMatchObject({ threshold: 1 / 6, cutoffHow: 'cost-based', costsSetByUser: true });
    const hand = settingsFromWorkspace(toWorkspace(A.setThreshold(initialState, 0.3), null, false));
    expect([hand.cutoffHow, hand.costsSetByUser]).toEqual(['hand', false]);
    const w = settingsFromWorkspace({ ...empty, fitOptions: {}, extra: { workbench } });
    expect('cutoffHow' in w || 'costsSetByUser' in w).toBe(false);
    for (const [extra, field] of [
      [{ cutoffHow: 'by magic' }, 'cutoffHow'],
      [{ costsSetByUser: 'yes' }, 'costsSetByUser'],
      [{ cutoffHow: null }, 'cutoffHow'],
      [{ costsSetByUser: 1 }, 'costsSetByUser'],
    ] as const) {
      const bad = { ...empty, fitOptions: {}, extra: { workbench: { ...workbench, ...extra } } };
      expect(() => settingsFromWorkspace(bad)).toThrow(`"workspace.extra.workbench.${field}"`);
    }
    // Written by another tool (no extra record): neither is known.
    const other = settingsFromWorkspace({ ...empty, fitOptions: {}, costs: { missedCase: 5, falseAlarm: 1 } });
    expect('cutoffHow' in other || 'costsSetByUser' in other).toBe(false);
  });

  it('an old workspace without them restores as before: cut-off "restored", costs set when not the default', () => {
    const summary = { source: { kind: 'file', name: 'a.csv', notice: null }, nRows: 1, columns: [], warnings: [] };
    const settings = settingsFromWorkspace({
      ...empty,
      fitOptions: {},
      extra: { workbench: { ...workbench, threshold: 1 / 6 } },
    });
    const s = A.workspaceRestored(initialState, { summary: summary as never, settings });
    expect(s).toMatchObject({ threshold: 1 / 6, cutoffHow: 'restored', costsSetByUser: true });
    const d = settingsFromWorkspace({
      ...empty,
      fitOptions: {},
      extra: { workbench: { ...workbench, costs: { missedCase: 10, falseAlarm: 1 } } },
    });
    expect(A.workspaceRestored(initialState, { summary: summary as never, settings: d }).costsSetByUser).toBe(false);
  });

  it('restoring ignores roles and an outcome of columns the data no longer have', () => {
    const summary = {
      source: { kind: 'file', name: 'a.csv', notice: null },
      nRows: 2,
      warnings: [],
      suggestedSpec: null,
      truth: null,
      format: null,
      columns: [
        {
          name: 'age',
          kind: 'numeric',
          type: 'numeric',
          reason: '',
          modelling: true,
          levels: [],
          missing: 0,
          distinct: 2,
          min: 1,
          median: 1.5,
          max: 2,
          bins: [],
          proposedEvent: null,
        },
      ],
    } as DataSummary;
    const settings = {
      ...settingsFromWorkspace({
        fileName: null,
        data: null,
        spec: null,
        fitOptions: {},
        seed: null,
        threshold: null,
        costs: null,
        freeText: {},
      }),
      outcome: 'gone',
      roles: {
        age: { include: true, reference: null, knots: 0 as const },
        gone: { include: true, reference: null, knots: 0 as const },
      },
      interactions: [['age', 'gone']] as [string, string][],
    };
    const s = A.workspaceRestored(createStore().get(), { summary, settings });
    expect(Object.keys(s.roles)).toEqual(['age']);
    expect(s.outcome).toBeNull();
    expect(s.interactions).toEqual([]);
  });
});

describe('the engine’s data calls', () => {
  it('hands back a copy of the loaded data, and profiles data loaded without a summary', async () => {
    const api = createApi();
    await api.loadDemo('seals');
    const got = (await api.getDataset())!;
    const col = got.data.columns.find((c) => c.kind === 'numeric')!;
    const rows = await api.getRows(0, 1);
    if (col.kind === 'numeric') col.values.fill(-1);
    expect(await api.getRows(0, 1)).toEqual(rows);

    const fresh = createApi();
    expect(await fresh.getDataset()).toBeNull();
    const summary = await fresh.loadDataset(got.data, null, 'seals.csv');
    expect(summary.source).toEqual({ kind: 'file', name: 'seals.csv', notice: null });
    expect(summary.columns.map((c) => c.name)).toEqual(got.summary.columns.map((c) => c.name));
    expect(summary.nRows).toBe(got.summary.nRows);
  });
});
