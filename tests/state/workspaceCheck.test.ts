import { describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import { WORKSPACE_KEY, type KeyValueBackend } from '../../src/io/export/persist';
import { readWorkspaceBytes, workspaceToJson, type Workspace } from '../../src/io/export/workspaceFile';
import * as A from '../../src/state/actions';
import { createAutosave } from '../../src/state/autosave';
import { MANIFEST_KEY } from '../../src/io/export/keptData';
import { createController } from '../../src/state/controller';
import { isStale } from '../../src/state/stale';
import { createStore } from '../../src/state/store';
import { checkWorkspace, workbenchChecks } from '../../src/state/workspaceCheck';
import { settingsOf } from '../../src/state/workspace';
import { createApi } from '../../src/worker/api';

/** The page's controller on the real worker api, in-process; failures go to the notice list as on the page. */
function harness(storage: KeyValueBackend = memoryBackend()) {
  const api = createApi(undefined, storage);
  const store = createStore();
  const report = (e: unknown) => {
    const err = e as { code?: string; message?: string; suggestion?: string };
    if (err.code !== 'cancelled') store.apply(A.notify, { kind: 'error', text: err.message ?? String(e) });
    return undefined;
  };
  const client: WorkerClient = {
    call: (run) => run(api as never).catch(report),
    latest: (_key, run) => run(api as never).catch(report),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: (id) => void api.cancel(id),
    restart: () => {},
    terminate: () => {},
  };
  return { store, ctl: createController(store, client), api };
}

function memoryBackend(): KeyValueBackend & { map: Map<string, unknown> } {
  const map = new Map<string, unknown>();
  return {
    map,
    get: async (k) => (map.has(k) ? structuredClone(map.get(k)) : undefined),
    set: async (k, v) => void map.set(k, structuredClone(v)),
    del: async (k) => void map.delete(k),
  };
}

const estimates = (s: ReturnType<typeof createStore>) => s.get().fit?.fit.coefficients.map((c) => c.estimate) ?? [];

/** The saved workspace file of a fitted demo, as plain JSON to tamper with. */
async function savedFileJson(): Promise<Record<string, unknown>> {
  const h = harness();
  await h.ctl.startDemo('ssi');
  const file = await h.ctl.workspaceFile('test');
  const { workspace, info } = await readWorkspaceBytes(file!.bytes);
  return JSON.parse(workspaceToJson(workspace, { fulcraVersion: info.fulcraVersion, saved: info.saved }));
}

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any
/** Each tampered file: what was changed, and the field the refusal must name. */
const TAMPERED: [string, (f: Json) => void, string][] = [
  // The three files of issue 18: accepted, then raw errors ("reading 'map'", 'level = "high"').
  ['a summary column without its levels', (f) => delete f.workspace.extra.summary.columns[0].levels, 'levels'],
  ['the fit option level "high"', (f) => (f.workspace.extra.workbench.level = 'high'), 'workbench.level'],
  ['the summary without its columns', (f) => delete f.workspace.extra.summary.columns, 'summary.columns'],
  // Others: missing arrays, wrong types, values out of range, a summary of other data.
  ['roles without their list of interactions', (f) => delete f.workspace.extra.workbench.interactions, 'interactions'],
  ['a role whose knots are text', (f) => (f.workspace.extra.workbench.roles.age.knots = 'many'), 'roles.age.knots'],
  ['the method "magic"', (f) => (f.workspace.extra.workbench.method = 'magic'), 'workbench.method'],
  ['an iteration limit of 0', (f) => (f.workspace.extra.workbench.maxIter = 0), 'workbench.maxIter'],
  ['a cut-off of 7', (f) => (f.workspace.extra.workbench.threshold = 7), 'workbench.threshold'],
  ['costs as text', (f) => (f.workspace.extra.workbench.costs = 'cheap'), 'workbench.costs'],
  ['an outcome that is a number', (f) => (f.workspace.extra.workbench.outcome = 3), 'workbench.outcome'],
  ['the summary of another row count', (f) => (f.workspace.extra.summary.nRows = 5), 'summary.nRows'],
  ['a summary column renamed', (f) => (f.workspace.extra.summary.columns[1].name = 'other'), 'columns[1]'],
  [
    'a summary bin count as text',
    (f) => (f.workspace.extra.summary.columns[0].bins = [{ label: 'a', count: 'x' }]),
    'bins[0].count',
  ],
  ['the data without their columns', (f) => delete f.workspace.data.columns, 'data.columns'],
  ['fit options level "high"', (f) => (f.workspace.fitOptions.level = 'high'), 'fitOptions.level'],
  [
    'a fitted request with level 2',
    (f) => (f.workspace.extra.workbench.fittedRequest.level = 2),
    'fittedRequest.level',
  ],
  [
    'a fitted request on a column the data lack',
    (f) => (f.workspace.extra.workbench.fittedRequest.spec.outcome = 'gone'),
    'fittedRequest.spec',
  ],
];

describe('one check of a saved workspace, for a file and for the work kept in this browser', () => {
  it('refuses each tampered file naming the field, and the work on the page stays as it was', async () => {
    const good = await savedFileJson();
    const h = harness();
    await h.ctl.startDemo('seals');
    const before = { est: estimates(h.store), data: h.store.get().data, rows: await h.ctl.getRows(0, 3) };
    for (const [what, tamper, field] of TAMPERED) {
      const f = structuredClone(good);
      tamper(f);
      const first = h.store.get().nextNoticeId;
      await h.ctl.openWorkspaceFile(Object.assign(new Blob([JSON.stringify(f)]), { name: 'tampered.json' }));
      const s = h.store.get();
      const errors = s.notices.filter((n) => n.id >= first && n.kind === 'error').map((n) => n.text);
      expect([what, errors.length]).toEqual([what, 1]);
      expect(errors[0], what).toMatch(/damaged or incomplete/);
      expect(errors[0], what).toContain(field);
      expect(errors[0], what).not.toMatch(/Cannot read|undefined|is not valid; expected/);
      expect(
        s.notices.some((n) => n.id >= first && /^Opened the workspace/.test(n.text)),
        what,
      ).toBe(false);
      expect(s.data, what).toBe(before.data);
      expect(estimates(h.store), what).toEqual(before.est);
      // The worker still holds the page's data (a refused file never reached it).
      expect(await h.ctl.getRows(0, 3), what).toEqual(before.rows);
      for (const n of s.notices) h.store.apply(A.dismiss, n.id);
    }
    // The untouched file opens.
    await h.ctl.openWorkspaceFile(Object.assign(new Blob([JSON.stringify(good)]), { name: 'good.json' }));
    expect(h.store.get().notices.some((n) => n.text === 'Opened the workspace good.json.')).toBe(true);
    expect(h.store.get().data?.nRows).toBe(2000);
  });

  it('a damaged record kept in this browser is refused the same way and is not deleted', async () => {
    const backend = memoryBackend();
    const first = harness(backend);
    const autosave = createAutosave(first.store, first.ctl, { version: 'test', backend, delayMs: 5 });
    const stop = autosave.start();
    await first.ctl.startDemo('ssi');
    await autosave.flush();
    stop();
    const stored = backend.map.get(WORKSPACE_KEY) as Json;
    stored.workspace.extra.workbench.level = 'high';
    const page = harness(backend);
    const restored = await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore();
    expect(restored).toBe(false);
    const error = page.store.get().notices.find((n) => n.kind === 'error');
    expect(error?.text).toMatch(/stored workspace is damaged or incomplete: "workspace\.extra\.workbench\.level"/);
    expect(page.store.get().data).toBeNull();
    expect(backend.map.has(WORKSPACE_KEY) && backend.map.has(MANIFEST_KEY)).toBe(true);
  });

  it('has a row for every setting the page keeps, so a new setting cannot be saved unchecked', () => {
    expect(Object.keys(workbenchChecks).sort()).toEqual(Object.keys(settingsOf(createStore().get())).sort());
  });

  it('takes the default for a setting absent from an older workspace', () => {
    const ws: Workspace = {
      fileName: null,
      data: null,
      spec: null,
      fitOptions: {},
      seed: null,
      threshold: null,
      costs: null,
      freeText: {},
      extra: { workbench: { roles: {}, interactions: [], costs: { missedCase: 5, falseAlarm: 1 } } },
    };
    expect(checkWorkspace(ws).workbench).toEqual({
      roles: {},
      interactions: [],
      costs: { missedCase: 5, falseAlarm: 1 },
    });
  });
});

describe('a result carries the request it was fitted for', () => {
  it('roles changed after the fit: the reload shows the same model, marked out of date', async () => {
    const backend = memoryBackend();
    const first = harness(backend);
    const autosave = createAutosave(first.store, first.ctl, { version: 'test', backend, delayMs: 5 });
    const stop = autosave.start();
    await first.ctl.startDemo('ssi');
    const fitted = estimates(first.store);
    await first.ctl.act(A.changeRole, { column: 'bmi', role: { include: false } });
    expect(isStale(first.store.get())).toBe(true);
    await autosave.flush();
    stop();

    const page = harness(backend);
    expect(await createAutosave(page.store, page.ctl, { version: 'test', backend }).restore()).toBe(true);
    const s = page.store.get();
    expect(s.roles.bmi.include).toBe(false);
    expect(estimates(page.store)).toEqual(fitted);
    expect(s.fit?.fit.coefficients.some((c) => c.name === 'bmi')).toBe(true);
    expect(isStale(s)).toBe(true);
  });

  it('roles changed while a fit runs: the finished result shows as out of date', async () => {
    const h = harness();
    await h.ctl.startDemo('ssi');
    h.store.apply(A.chooseMethod, 'firth');
    const running = h.ctl.fitModel();
    await h.ctl.act(A.changeRole, { column: 'bmi', role: { include: false } });
    await running;
    const s = h.store.get();
    expect(s.fit?.request.method).toBe('firth');
    expect(s.fit?.fit.coefficients.some((c) => c.name === 'bmi')).toBe(true);
    expect(isStale(s)).toBe(true);
  });
});
