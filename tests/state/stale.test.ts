import { describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import * as A from '../../src/state/actions';
import { createController } from '../../src/state/controller';
import { STALE_EXPORT } from '../../src/state/effects/exports';
import { isStale } from '../../src/state/stale';
import { createStore } from '../../src/state/store';
import { createApi } from '../../src/worker/api';

function harness() {
  const api = createApi();
  const errors: string[] = [];
  const client: WorkerClient = {
    call: (run) =>
      run(api as never).catch((e: { message?: string }) => {
        errors.push(e.message ?? String(e));
        return undefined;
      }),
    latest: (_key, run) => run(api as never),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: () => {},
    restart: () => {},
    terminate: () => {},
  };
  const store = createStore();
  return { store, ctl: createController(store, client), errors };
}

describe('isStale: the results shown belong to the settings of their fit', () => {
  it('is false before a fit and right after one; every model setting makes it true, a refit false', async () => {
    const { store, ctl } = harness();
    expect(isStale(store.get())).toBe(false);
    await ctl.startDemo('ssi');
    expect(isStale(store.get())).toBe(false);
    const fitted = store.get();
    const changes: [string, (s: typeof fitted) => typeof fitted][] = [
      ['untick a predictor', (s) => A.setPredictor(s, { column: 'age', role: { include: false } })],
      ['a spline', (s) => A.setPredictor(s, { column: 'age', role: { knots: 4 } })],
      ['a reference level', (s) => A.setPredictor(s, { column: 'wound_class', role: { reference: 'dirty' } })],
      ['an interaction', (s) => A.toggleInteraction(s, ['age', 'bmi'])],
      ['the method', (s) => A.chooseMethod(s, 'firth')],
      ['the level', (s) => A.setLevel(s, 0.9)],
      ['the iteration limit', (s) => A.setMaxIter(s, 7)],
      ['the event', (s) => A.chooseEvent(s, 'no')],
      ['no outcome', (s) => A.chooseOutcome(s, { column: null })],
    ];
    for (const [what, change] of changes) expect([what, isStale(change(fitted))]).toEqual([what, true]);
    // Changing a setting back to what was fitted is not stale; the cut-off and costs are not model settings.
    const back = A.setPredictor(A.setPredictor(fitted, { column: 'age', role: { include: false } }), {
      column: 'age',
      role: { include: true },
    });
    expect(isStale(back)).toBe(false);
    expect(isStale(A.setCosts(A.setThreshold(fitted, 0.3), { missedCase: 3 }))).toBe(false);

    await ctl.act(A.changeRole, { column: 'age', role: { include: false } });
    expect(isStale(store.get())).toBe(true);
    await ctl.fitModel();
    expect(isStale(store.get())).toBe(false);
    expect(store.get().fit?.fit.recipe.terms.some((t) => 'column' in t && t.column === 'age')).toBe(false);
  });

  it('refuses the PDF, the model file and PMML of a stale model with a notice that offers to refit', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('seals');
    const first = store.get().data!.suggestedSpec!.terms.find((t) => t.type === 'main' || t.type === 'spline')!;
    await ctl.act(A.changeRole, { column: 'column' in first ? first.column : '', role: { include: false } });
    expect(await ctl.modelReport({})).toBeUndefined();
    expect(await ctl.modelFile({})).toBeUndefined();
    expect(await ctl.pmml()).toBeUndefined();
    const refusals = store.get().notices.filter((n) => n.text === STALE_EXPORT);
    expect(refusals).toHaveLength(1);
    expect(refusals[0].action).toBe('refit');
    await ctl.useRemedy('refit', refusals[0].id);
    expect(isStale(store.get())).toBe(false);
    expect(store.get().notices.some((n) => n.text === STALE_EXPORT)).toBe(false);
    const text = await ctl.modelFile({});
    expect(JSON.parse(text!)).toBeTruthy();
  });
});

describe('a new data set clears the notices that belong to the old one', () => {
  it('drops warnings, remedies, refusals and failed calls of the old data; keeps problems of the page', () => {
    let s = A.notify(A.startAfresh(A.dataLoaded({ ...createStore().get() }, seals()), undefined), {
      kind: 'error',
      text: 'This browser refused to keep the workspace.',
      code: 'storage-full',
    });
    s = A.withWarnings(s, [{ code: 'quasi-separation', message: 'Separation in x.', suggestion: 'Use Firth.' }]);
    s = A.notify(s, { kind: 'error', text: STALE_EXPORT, action: 'refit', code: A.STALE_EXPORT_CODE });
    s = A.notify(s, { kind: 'error', text: 'The file to score has an unknown category.' });
    s = A.notify(s, { kind: 'info', text: 'Restored your work.', action: 'start-afresh' });
    expect(s.notices).toHaveLength(5);
    const next = A.dataLoaded(s, { ...seals(), warnings: [{ code: 'ragged', message: 'Row 4.', suggestion: '' }] });
    expect(next.notices.map((n) => n.text)).toEqual(['This browser refused to keep the workspace.', 'Row 4.']);
  });

  it('opening a demo after another clears the first one’s model warnings', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('ssi');
    store.apply(A.withWarnings, [{ code: 'few-events', message: 'Only 3 events.', suggestion: 'Use ridge.' }]);
    expect(store.get().notices.some((n) => n.text === 'Only 3 events.')).toBe(true);
    await ctl.startDemo('seals');
    expect(store.get().notices.some((n) => n.text === 'Only 3 events.')).toBe(false);
  });
});

function seals() {
  return {
    source: { kind: 'demo' as const, name: 'seals', notice: null },
    nRows: 3,
    columns: [],
    warnings: [],
    suggestedSpec: null,
    truth: null,
    format: null,
  };
}
