import { describe, expect, it } from 'vitest';
import { generateSsiWardMonths } from '../../src/engine/demo';
import { proposeCountLayout } from '../../src/io/countLayout';
import { FieldChecker } from '../../src/io/export/validate';
import * as A from '../../src/state/actions';
import { initialState, type AppState } from '../../src/state/appState';
import { settingsOf } from '../../src/state/workspace';
import { checkWorkbench } from '../../src/state/workspaceCheck';
import type { DataSummary } from '../../src/worker/protocol';

const col = (name: string, kind: 'numeric' | 'categorical', levels: string[] = []) => ({
  name,
  kind,
  type: kind === 'numeric' ? ('numeric' as const) : ('categorical' as const),
  reason: '',
  modelling: true,
  levels,
  missing: 0,
  distinct: levels.length,
  min: null,
  median: null,
  max: null,
  bins: [],
  proposedEvent: null,
});

const table: DataSummary = {
  source: { kind: 'file', name: 'wards.csv', notice: null },
  nRows: 144,
  columns: [
    col('ward', 'categorical', ['Alder', 'Birch']),
    col('month', 'numeric'),
    col('operations', 'numeric'),
    col('infections', 'numeric'),
    col('copies', 'numeric'),
  ],
  warnings: [],
  suggestedSpec: null,
  countLayout: {
    events: 'infections',
    layout: { kind: 'events-trials', trials: 'operations' },
    hint: 'The table looks like counts.',
  },
  truth: null,
  format: null,
};

describe('outcome layouts on the page', () => {
  it('a loaded table of counts takes the proposed layout and says so', () => {
    const s = A.dataLoaded(initialState, table);
    expect(s.layout).toEqual({ kind: 'events-trials', trials: 'operations' });
    expect(s.outcome).toBe('infections');
    expect(s.event).toBeNull();
    expect(s.notices.map((n) => n.text)).toContain('The table looks like counts.');
  });

  it('builds the grouped spec, without the count and weight columns as predictors', () => {
    let s: AppState = A.dataLoaded(initialState, table);
    expect(A.buildSpec(s)).toEqual({ problem: 'Choose at least one predictor.' });
    s = A.chooseWeights(s, 'copies');
    for (const column of ['ward', 'month', 'operations', 'copies'])
      s = A.setPredictor(s, { column, role: { include: true } });
    const built = A.buildSpec(s);
    expect(built).toEqual({
      spec: {
        outcome: 'infections',
        layout: { kind: 'events-trials', trials: 'operations' },
        weights: 'copies',
        terms: [
          { type: 'main', column: 'ward' },
          { type: 'main', column: 'month' },
        ],
      },
    });
  });

  it('asks for the count column, and for the event again after switching back to yes/no', () => {
    let s: AppState = A.dataLoaded(initialState, table);
    s = A.chooseLayout(s, { kind: 'events-nonevents', nonEvents: '' });
    s = A.setPredictor(s, { column: 'ward', role: { include: true } });
    expect(A.buildSpec(s)).toEqual({ problem: 'Choose the column of non-events per row.' });
    s = A.chooseLayout(s, { kind: 'binary' });
    expect(s.event).toBeNull(); // a count column has no yes/no levels to propose
    expect(A.buildSpec(s)).toHaveProperty('problem');
  });

  it('keeps the layout and weights in a saved workspace and checks them on reading', () => {
    let s: AppState = A.dataLoaded(initialState, table);
    s = A.chooseWeights(s, 'copies');
    const saved = JSON.parse(JSON.stringify(settingsOf(s)));
    const back = checkWorkbench(new FieldChecker('workspace-file-invalid', 'workspace file'), saved, 'workbench');
    expect(back.layout).toEqual({ kind: 'events-trials', trials: 'operations' });
    expect(back.weights).toBe('copies');
    expect(() =>
      checkWorkbench(
        new FieldChecker('workspace-file-invalid', 'workspace file'),
        { ...saved, layout: { kind: 'events-trials' } },
        'workbench',
      ),
    ).toThrow(/workbench\.layout\.trials/);
  });
});

describe('proposeCountLayout', () => {
  it('proposes events and trials on the invented ward-month table (names and never above)', () => {
    const p = proposeCountLayout(generateSsiWardMonths().dataset);
    expect(p?.events).toBe('infections');
    expect(p?.layout).toEqual({ kind: 'events-trials', trials: 'operations' });
  });
  it('proposes nothing for whole-number columns whose names say nothing (parity never above age)', () => {
    const n = 50;
    const data = {
      nRows: n,
      columns: [
        { kind: 'numeric' as const, name: 'parity', values: Float64Array.from({ length: n }, (_, i) => i % 4) },
        { kind: 'numeric' as const, name: 'age', values: Float64Array.from({ length: n }, (_, i) => 20 + i) },
      ],
    };
    expect(proposeCountLayout(data)).toBeNull();
  });
  it('proposes events and non-events when the names say so', () => {
    const n = 20;
    const data = {
      nRows: n,
      columns: [
        { kind: 'numeric' as const, name: 'ncases', values: Float64Array.from({ length: n }, (_, i) => i % 5) },
        { kind: 'numeric' as const, name: 'ncontrols', values: Float64Array.from({ length: n }, (_, i) => 2 + i) },
      ],
    };
    expect(proposeCountLayout(data)?.layout).toEqual({ kind: 'events-nonevents', nonEvents: 'ncontrols' });
  });
});
