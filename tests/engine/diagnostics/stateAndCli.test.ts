import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../../src/cli/args';
import { resolveRequest } from '../../../src/engine/workflow';
import { initialState, type AppState } from '../../../src/state/appState';
import * as I from '../../../src/state/influenceState';
import { requestOf } from '../../../src/state/effects/fitting';
import type { FitView } from '../../../src/worker/protocol';

const spec = { outcome: 'y', terms: [{ type: 'main' as const, column: 'x' }] };

describe('npm run fit --diagnostics / --leave-out', () => {
  it('parses both flags; bad row numbers are refused by name', () => {
    const a = parseFitArgs(['d.csv', '--outcome', 'y', '--diagnostics', '--leave-out', '12, 45']);
    expect(a.diagnostics).toBe(true);
    expect(a.leaveOut).toEqual([12, 45]);
    expect(parseFitArgs(['d.csv', '--outcome', 'y']).diagnostics).toBe(false);
    expect(() => parseFitArgs(['d.csv', '--outcome', 'y', '--leave-out', 'x'])).toThrow(/--leave-out needs/);
  });
  it('the request records the rows left out and refuses repeats', () => {
    expect(resolveRequest({ spec }).leaveOut).toEqual([]);
    expect(resolveRequest({ spec, leaveOut: [7] }).leaveOut).toEqual([7]);
    expect(() => resolveRequest({ spec, leaveOut: [7, 7] })).toThrow(/leaveOut = \[7,7\] is not valid/);
  });
});

const fitView = (leaveOut: number[]): FitView =>
  ({
    request: { ...resolveRequest({ spec }), leaveOut },
    rowsUsed: 100,
    rows: [{ name: 'x', term: 'x', oddsRatio: 2, waldLower: 0.1, waldUpper: 1.2, aliased: false }] as FitView['rows'],
  }) as unknown as FitView;

describe('the "leave these rows out" intent', () => {
  const base: AppState = { ...initialState, fit: fitView([]) };
  it('keeps the all-rows odds ratios and asks for the refit only when rows are ticked', () => {
    expect(I.refitWithoutRows.follows(base, I.refitWithoutRows.perform(base, undefined))).toEqual([]);
    const ticked = I.toggleLeaveOut(I.toggleLeaveOut(base, 45), 12);
    expect(ticked.influence.selected).toEqual([12, 45]);
    const after = I.refitWithoutRows.perform(ticked, undefined);
    expect(after.influence.before?.odds[0].oddsRatio).toBe(2);
    expect(after.influence.before?.rowsUsed).toBe(100);
    expect(I.refitWithoutRows.follows(ticked, after)).toEqual(['refit-without-rows']);
    expect(I.rowsToLeaveOut(after)).toEqual([12, 45]);
    expect(I.toggleLeaveOut(ticked, 12).influence.selected).toEqual([45]);
  });
  it('adds to the rows already left out and keeps the first all-rows odds ratios', () => {
    const first = { ...base, influence: { ...base.influence, before: { rowsUsed: 101, odds: [] } } };
    const s = I.toggleLeaveOut({ ...first, fit: fitView([7]) }, 9);
    const after = I.refitWithoutRows.perform(s, undefined);
    expect(after.influence.before?.rowsUsed).toBe(101);
    expect(I.rowsToLeaveOut(after)).toEqual([7, 9]);
  });
  it('later fits keep the rows left out (recorded in the request), until all rows come back', () => {
    const s = {
      ...initialState,
      data: {
        columns: [
          { name: 'y', distinct: 2, kind: 'categorical' },
          { name: 'x', distinct: 9, kind: 'numeric' },
        ],
      },
      fit: fitView([7]),
    } as unknown as AppState;
    const built = requestOf({
      ...s,
      outcome: 'y',
      event: '1',
      roles: { x: { include: true, reference: null, knots: 0 } },
    });
    if ('problem' in built) throw new Error(built.problem);
    expect(built.request.leaveOut).toEqual([7]);
    expect(
      I.allRowsBack(I.refitWithoutRows.perform(I.toggleLeaveOut(s, 9), undefined), undefined).influence.before,
    ).toBeNull();
  });
  it('a click on a row shows the data grid at that row', () => {
    const s = I.showSheetRow(base, { sheetRow: 1056, dataRow: 1054 });
    expect(s.view).toBe('data');
    expect(s.influence.showRow).toEqual({ sheetRow: 1056, dataRow: 1054 });
  });
});
