import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import * as A from '../../src/state/actions';
import { initialState, type AppState } from '../../src/state/appState';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import { createApi } from '../../src/worker/api';
import type { CostView, FitView } from '../../src/worker/protocol';

/** A cost view with only the two cut-offs the intents read. */
const view = (costBased: number, cheapest: number | null): CostView =>
  ({
    optimal: { decisionTheory: { threshold: costBased }, empirical: { threshold: cheapest } },
  }) as unknown as CostView;

const fitted = (cv: CostView | null = view(1 / 11, 0.12)): AppState => ({
  ...initialState,
  fit: {} as FitView,
  costView: cv,
  threshold: 1 / 11,
});

const act = <I>(intent: A.Intent<I>, before: AppState, input: I) => {
  const after = intent.perform(before, input);
  return { after, effects: intent.follows(before, after) };
};

describe('how the cut-off was set', () => {
  it('the slider sets it by hand; the two buttons set the cost-based or the cheapest cut-off', () => {
    const hand = act(A.moveCutoff, fitted(), 0.2);
    expect(hand.after).toMatchObject({ threshold: 0.2, cutoffHow: 'hand' });
    expect(hand.effects).toEqual(['query-threshold']);
    const cost = act(A.useCostBasedCutoff, hand.after, undefined);
    expect(cost.after).toMatchObject({ threshold: 1 / 11, cutoffHow: 'cost-based' });
    expect(cost.effects).toEqual(['query-threshold']);
    const cheap = act(A.useCheapestCutoff, cost.after, undefined);
    expect(cheap.after).toMatchObject({ threshold: 0.12, cutoffHow: 'cheapest' });
  });

  it('a button without a cut-off to offer changes nothing', () => {
    const s = { ...fitted(view(1 / 11, null)), cutoffHow: 'hand' as const };
    expect(act(A.useCheapestCutoff, s, undefined)).toEqual({ after: s, effects: [] });
    const none = fitted(null);
    expect(act(A.useCostBasedCutoff, none, undefined).after).toBe(none);
  });

  it('a cost-based or cheapest cut-off follows new costs; one set by hand stays where it is', () => {
    const costBased = A.costsDone({ ...fitted(), cutoffHow: 'cost-based' }, view(1 / 6, 0.3));
    expect(costBased).toMatchObject({ threshold: 1 / 6, cutoffHow: 'cost-based' });
    const cheapest = A.costsDone({ ...fitted(), cutoffHow: 'cheapest' }, view(1 / 6, 0.3));
    expect(cheapest).toMatchObject({ threshold: 0.3, cutoffHow: 'cheapest' });
    const hand = A.costsDone({ ...fitted(), threshold: 0.42, cutoffHow: 'hand' }, view(1 / 6, 0.3));
    expect(hand).toMatchObject({ threshold: 0.42, cutoffHow: 'hand' });
  });

  it('starts as cost-based (the first fit puts it there); a cut-off set directly counts as set by hand', () => {
    expect(initialState.cutoffHow).toBe('cost-based');
    expect(A.setThreshold(initialState, 0.3).cutoffHow).toBe('hand');
  });
});

describe('a restored workspace', () => {
  // As a workspace saved before it kept how the cut-off was set and whether the costs were the user's.
  const { cutoffHow: _how, costsSetByUser: _set, ...old } = initialState;
  const settings = (missedCase: number) => ({
    ...old,
    costs: { missedCase, falseAlarm: 1 },
    threshold: 0.25,
    fitted: true,
  });
  const summary = { source: { kind: 'file', name: 'a.csv', notice: null }, nRows: 1, columns: [], warnings: [] };

  it('says its cut-off was restored, and its costs set unless they are the default', () => {
    const s = A.workspaceRestored(initialState, { summary: summary as never, settings: settings(20) });
    expect(s).toMatchObject({ threshold: 0.25, cutoffHow: 'restored', costsSetByUser: true });
    const d = A.workspaceRestored(initialState, { summary: summary as never, settings: settings(10) });
    expect(d.costsSetByUser).toBe(false);
  });
});

describe('the costs', () => {
  it('start as the default, not set by the user; a typed valid cost marks them as set', () => {
    expect(initialState.costsSetByUser).toBe(false);
    const s = A.setCosts(initialState, { missedCase: 5 });
    expect(s).toMatchObject({ costs: { missedCase: 5, falseAlarm: 1 }, costsSetByUser: true });
    expect(A.setCosts(initialState, { missedCase: 10 })).toBe(initialState);
  });

  it('refuses 0, a negative, an infinite or a missing cost, keeping the costs in force', () => {
    for (const bad of [0, -5, Infinity, NaN]) {
      expect(A.setCosts(initialState, { missedCase: bad })).toBe(initialState);
      expect(A.setCosts(initialState, { falseAlarm: bad })).toBe(initialState);
    }
    expect(act(A.changeCosts, fitted(), { falseAlarm: -5 }).effects).toEqual([]);
  });

  it('are kept as set (or not) across a new data set', () => {
    const set = A.setCosts(initialState, { falseAlarm: 2 });
    const summary = { source: { kind: 'file', name: 'a.csv', notice: null }, nRows: 1, columns: [], warnings: [] };
    expect(A.dataLoaded(set, summary as never).costsSetByUser).toBe(true);
    expect(A.dataLoaded(initialState, summary as never).costsSetByUser).toBe(false);
  });
});

/** The page's controller wired to the real worker api in-process. */
function harness() {
  const api = createApi();
  const client: WorkerClient = {
    call: (run) => run(api as never),
    latest: (_key, run) => run(api as never),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: () => {},
    restart: () => {},
    terminate: () => {},
  };
  const store = createStore();
  return { store, ctl: createController(store, client) };
}

const dir = mkdtempSync(join(tmpdir(), 'fulcra-cutoff-'));
function pdfText(bytes: Uint8Array, name: string): string {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

describe('the PDF says how the cut-off and the costs came about', () => {
  it('default costs and cost-based cut-off, then costs 5 : 1 with the button, then a hand-set cut-off', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('seals');
    let text = pdfText((await ctl.modelReport({}))!, 'default');
    expect(text).toContain('the default 10 : 1, not set by the user');
    expect(text).toContain('cost-based: 1/(1 + 10) = 9.1%');
    expect(text).not.toContain('chosen on the page');

    await ctl.act(A.moveCutoff, 0.2);
    await ctl.act(A.changeCosts, { missedCase: 5 });
    await ctl.act(A.useCostBasedCutoff, undefined);
    expect(store.get().threshold).toBeCloseTo(1 / 6, 12);
    text = pdfText((await ctl.modelReport({}))!, 'cost-based');
    expect(text).toContain('cost-based: 1/(1 + 5) = 16.7%');
    expect(text).toContain('ratio 5 : 1');
    expect(text).not.toContain('not set by the user');

    await ctl.act(A.useCheapestCutoff, undefined);
    text = pdfText((await ctl.modelReport({}))!, 'cheapest');
    expect(text).toContain('cheapest observed cut-off');

    await ctl.act(A.moveCutoff, 0.12);
    text = pdfText((await ctl.modelReport({}))!, 'hand');
    expect(text).toContain('set by hand on the page at 12.0%');
  });
});
