import { describe, expect, it } from 'vitest';
import * as A from '../../src/state/actions';
import { initialState, type AppState } from '../../src/state/appState';
import { requestOf } from '../../src/state/effects/fitting';
import { isStale } from '../../src/state/stale';
import { createStore } from '../../src/state/store';
import type { DataSummary, FitView } from '../../src/worker/protocol';

const col = (
  name: string,
  kind: 'numeric' | 'categorical',
  levels: string[] = [],
  proposedEvent: string | null = null,
) => ({
  name,
  kind,
  type:
    kind === 'numeric' ? ('numeric' as const) : levels.length === 2 ? ('binary' as const) : ('categorical' as const),
  reason: '',
  modelling: true,
  levels,
  missing: 0,
  distinct: levels.length,
  min: null,
  median: null,
  max: null,
  bins: [],
  proposedEvent,
});

const data: DataSummary = {
  source: { kind: 'file', name: 'x.csv', notice: null },
  nRows: 10,
  columns: [
    col('age', 'numeric'),
    col('ward', 'categorical', ['A', 'B', 'C']),
    col('dm', 'categorical', ['no', 'yes'], 'yes'),
    col('infected', 'categorical', ['no', 'yes'], 'yes'),
  ],
  warnings: [{ code: 'ragged', message: 'Row 4 has 3 cells.', suggestion: 'Check row 4.' }],
  suggestedSpec: null,
  truth: null,
  format: null,
};

const loaded = (): AppState => A.dataLoaded(initialState, data);

describe('state actions', () => {
  it('loading data clears roles and shows the importer warnings once, in the one notice list', () => {
    const s = A.dataLoaded(loaded(), data);
    expect(s.outcome).toBeNull();
    expect(Object.values(s.roles).every((r) => !r.include)).toBe(true);
    expect(s.notices.filter((n) => n.code === 'ragged')).toHaveLength(1);
  });

  it('takes roles and reference levels from a demo’s model', () => {
    const s = A.dataLoaded(initialState, {
      ...data,
      suggestedSpec: { outcome: 'infected', event: 'yes', terms: [{ type: 'main', column: 'ward', reference: 'B' }] },
    });
    expect(s.outcome).toBe('infected');
    expect(s.roles.ward).toEqual({ include: true, reference: 'B', knots: 0 });
    expect(A.buildSpec(s)).toEqual({
      spec: { outcome: 'infected', event: 'yes', terms: [{ type: 'main', column: 'ward', reference: 'B' }] },
    });
  });

  it('proposes the event level of a yes/no outcome and never uses the outcome as a predictor', () => {
    let s = A.chooseOutcome(loaded(), { column: 'infected' });
    expect(s.event).toBe('yes');
    s = A.setPredictor(s, { column: 'infected', role: { include: true } });
    expect(s.roles.infected.include).toBe(false);
  });

  it('says what is missing before a model can be fitted', () => {
    expect(A.buildSpec(initialState)).toEqual({ problem: 'Open a file or a demo first.' });
    expect(A.buildSpec(loaded())).toEqual({ problem: 'Choose the outcome column.' });
    const s = A.chooseOutcome(loaded(), { column: 'infected' });
    expect(A.buildSpec(s)).toEqual({ problem: 'Choose at least one predictor.' });
  });

  it('builds spline, reference-level and interaction terms from the roles', () => {
    let s = A.chooseOutcome(loaded(), { column: 'infected' });
    s = A.setPredictor(s, { column: 'age', role: { include: true, knots: 4 } });
    s = A.setPredictor(s, { column: 'ward', role: { include: true, reference: 'C' } });
    s = A.toggleInteraction(s, ['age', 'ward']);
    expect(A.buildSpec(s)).toEqual({
      spec: {
        outcome: 'infected',
        event: 'yes',
        terms: [
          { type: 'spline', column: 'age', knots: 4 },
          { type: 'main', column: 'ward', reference: 'C' },
          { type: 'interaction', columns: ['age', 'ward'] },
        ],
      },
    });
    expect(A.toggleInteraction(s, ['ward', 'age']).interactions).toEqual([]);
    expect(A.setPredictor(s, { column: 'ward', role: { include: false } }).interactions).toEqual([]);
  });

  it('marks the fit stale when a setting changes, and a new fit clears the results of the old one', () => {
    const ready = A.setPredictor(A.chooseOutcome(loaded(), { column: 'infected' }), {
      column: 'age',
      role: { include: true },
    });
    const built = requestOf(ready);
    const fit = {
      request: 'request' in built ? built.request : null,
      warnings: [{ code: 'few-events', message: 'Few events.', suggestion: 'Use a penalty.' }],
    } as unknown as FitView;
    let s = A.fitDone({ ...ready, riskCurve: {} as AppState['riskCurve'], validationStatus: 'done' }, fit);
    expect(isStale(s)).toBe(false);
    expect(s.riskCurve).toBeNull();
    expect(s.validationStatus).toBe('idle');
    expect(s.notices.find((n) => n.code === 'few-events')?.action).toBe('use-ridge');
    s = A.chooseMethod(s, 'firth');
    expect(isStale(s)).toBe(true);
  });

  it('takes an iteration limit from 1 to 10000, marks the fit stale, and the fit request carries it', () => {
    const ready = A.setPredictor(A.chooseOutcome(loaded(), { column: 'infected' }), {
      column: 'age',
      role: { include: true },
    });
    expect(ready.maxIter).toBe(50);
    const built = requestOf(ready);
    const fitted = { ...ready, fit: { request: 'request' in built ? built.request : null } as unknown as FitView };
    expect(isStale(fitted)).toBe(false);
    const s = A.setMaxIter(fitted, 300);
    expect([s.maxIter, isStale(s)]).toEqual([300, true]);
    for (const bad of [0, 10_001, 2.5, NaN]) expect(A.setMaxIter(s, bad)).toBe(s);
    const r = requestOf(s);
    expect('request' in r && r.request.maxIter).toBe(300);
  });

  it('offers Firth as the one-click remedy for separation', () => {
    const s = A.withWarnings(initialState, [
      { code: 'complete-separation', message: 'ward separates.', suggestion: 'Use Firth.' },
    ]);
    expect(s.notices[0]).toMatchObject({ kind: 'warning', action: 'use-firth', code: 'complete-separation' });
  });

  it('keeps the cut-off inside (0, 1) and ignores non-positive costs', () => {
    expect(A.setThreshold(initialState, 2).threshold).toBe(0.999);
    expect(A.setThreshold(initialState, -1).threshold).toBe(0.001);
    expect(A.setThreshold(initialState, NaN)).toBe(initialState);
    expect(A.setCosts(initialState, { missedCase: 0 })).toBe(initialState);
    expect(A.setCosts(initialState, { missedCase: 25 }).costs).toEqual({ missedCase: 25, falseAlarm: 1 });
  });

  it('does not show the same notice twice and dismisses by id', () => {
    let s = A.notify(initialState, { kind: 'error', text: 'Bad file.' });
    s = A.notify(s, { kind: 'error', text: 'Bad file.' });
    expect(s.notices).toHaveLength(1);
    expect(A.dismiss(s, s.notices[0].id).notices).toHaveLength(0);
  });

  it('after a worker crash forgets the data and keeps one error notice with a way back', () => {
    const s = A.workerLost(loaded(), 'The engine stopped.');
    expect(s.data).toBeNull();
    expect(s.notices.at(-1)).toMatchObject({ kind: 'error', text: 'The engine stopped.', action: 'reload' });
  });

  it('tracks job progress and removes a job when it ends', () => {
    let s = A.jobStarted(initialState, { id: 'b1', label: 'Bootstrap', done: 0, total: 0, cancellable: true });
    s = A.jobProgress(s, { id: 'b1', done: 5, total: 200 });
    expect(s.jobs[0]).toMatchObject({ done: 5, total: 200 });
    expect(A.jobEnded(s, 'b1').jobs).toEqual([]);
  });

  it('the store notifies subscribers only when an action changes the state', () => {
    const store = createStore();
    let calls = 0;
    store.subscribe(() => calls++);
    store.apply(A.setThreshold, NaN);
    store.apply(A.setThreshold, 0.3);
    expect(calls).toBe(1);
    expect(store.get().threshold).toBe(0.3);
  });
});

describe('reading the same file again', () => {
  it('keeps the roles of columns that still exist', () => {
    let s = A.chooseOutcome(loaded(), { column: 'infected' });
    s = A.setPredictor(s, { column: 'ward', role: { include: true, reference: 'B' } });
    const again = A.dataLoaded(s, { ...data, columns: data.columns.filter((c) => c.name !== 'age') });
    expect(again.outcome).toBe('infected');
    expect(again.roles.ward).toEqual({ include: true, reference: 'B', knots: 0 });
    expect(again.roles.age).toBeUndefined();
    const other = A.dataLoaded(s, { ...data, source: { kind: 'file', name: 'other.csv', notice: null } });
    expect(other.outcome).toBeNull();
  });
});

describe('what follows a change (intents)', () => {
  /** Applies `intent` to `before` and returns the new state with the effects it calls for. */
  const act = <I>(intent: A.Intent<I>, before: AppState, input: I) => {
    const after = intent.perform(before, input);
    return { after, effects: intent.follows(before, after) };
  };
  const fitted = (s: AppState): AppState => ({ ...s, fit: {} as FitView });

  it('a change of outcome, event, predictor or interaction asks for the rows the model would drop', () => {
    let s = act(A.changeOutcome, loaded(), { column: 'infected' });
    expect(s.effects).toEqual(['refresh-drop-report']);
    s = act(A.changeRole, s.after, { column: 'age', role: { include: true } });
    expect(s.effects).toEqual(['refresh-drop-report']);
    s = act(A.changeRole, s.after, { column: 'ward', role: { include: true } });
    expect(act(A.changeInteraction, s.after, ['age', 'ward']).effects).toEqual(['refresh-drop-report']);
    expect(act(A.changeEvent, s.after, 'no').effects).toEqual(['refresh-drop-report']);
  });

  it('asks for nothing when the change is refused or there are no data', () => {
    const s = A.chooseOutcome(loaded(), { column: 'infected' });
    expect(act(A.changeRole, s, { column: 'infected', role: { include: true } }).effects).toEqual([]);
    expect(act(A.changeOutcome, s, { column: 'no such column' }).effects).toEqual([]);
    expect(act(A.changeEvent, initialState, 'yes').effects).toEqual([]);
  });

  it('moving the cut-off asks for the confusion matrix only when there is a model and the cut-off moved', () => {
    expect(act(A.moveCutoff, loaded(), 0.2).effects).toEqual([]);
    expect(act(A.moveCutoff, fitted(loaded()), 0.2).effects).toEqual(['query-threshold']);
    expect(act(A.moveCutoff, fitted(loaded()), 0.5).effects).toEqual([]);
    expect(act(A.moveCutoff, fitted(loaded()), NaN).effects).toEqual([]);
  });

  it('a new cost asks for the cost curve; a refused cost asks for nothing', () => {
    const s = fitted(loaded());
    const moved = act(A.changeCosts, s, { missedCase: 4 });
    expect(moved.after.costs).toEqual({ missedCase: 4, falseAlarm: 1 });
    expect(moved.effects).toEqual(['refresh-costs']);
    expect(act(A.changeCosts, s, { falseAlarm: 0 }).effects).toEqual([]);
    expect(act(A.changeCosts, loaded(), { missedCase: 4 }).effects).toEqual([]);
  });

  it('reading a column as another type keeps the other choices and reads a file again, not a demo', () => {
    const s = { ...loaded(), importSettings: { ...loaded().importSettings, columnTypes: { age: 'text' as const } } };
    const file = act(A.readColumnAs, s, { column: 'ward', type: 'text' });
    expect(file.after.importSettings.columnTypes).toEqual({ age: 'text', ward: 'text' });
    expect(file.effects).toEqual(['reread']);
    const demo = { ...s, data: { ...data, source: { kind: 'demo' as const, name: 'SSI', notice: null } } };
    expect(act(A.readColumnAs, demo, { column: 'ward', type: 'text' }).effects).toEqual([]);
  });
});
