import { describe, expect, it } from 'vitest';
import * as A from '../../src/state/actions';
import { createStore } from '../../src/state/store';
import { settingsFromWorkspace, toWorkspace } from '../../src/state/workspace';

describe('odds ratios per a chosen unit (a page setting)', () => {
  it('is set per predictor; 1, 0, negative or non-finite units clear it', () => {
    let s = createStore().get();
    expect(s.oddsUnits).toEqual({});
    s = A.setOddsUnit(s, { term: 'age', unit: 10 });
    s = A.setOddsUnit(s, { term: 'bmi', unit: 5 });
    expect(s.oddsUnits).toEqual({ age: 10, bmi: 5 });
    for (const unit of [1, 0, -5, NaN, Infinity]) {
      const t = A.setOddsUnit(s, { term: 'bmi', unit });
      expect(t.oddsUnits, String(unit)).toEqual({ age: 10 });
    }
  });

  it('is saved in the workspace and comes back; an invalid saved entry is refused by name, not dropped', () => {
    const s = A.setOddsUnit(A.setOddsUnit(createStore().get(), { term: 'age', unit: 10 }), { term: 'bmi', unit: 2.5 });
    const ws = JSON.parse(JSON.stringify(toWorkspace(s, null, false)));
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({ age: 10, bmi: 2.5 });
    // one validator for workspace files (src/state/workspaceCheck.ts): a damaged entry is named, nothing is dropped
    ws.extra.workbench.oddsUnits = { age: 10, bad: -1 };
    expect(() => settingsFromWorkspace(ws)).toThrow(
      /"workspace\.extra\.workbench\.oddsUnits\.bad" must be a number above 0/,
    );
    ws.extra.workbench.oddsUnits = { age: 10, text: '5' };
    expect(() => settingsFromWorkspace(ws)).toThrow(/oddsUnits\.text/);
    ws.extra.workbench.oddsUnits = { age: 10 };
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({ age: 10 });
    delete ws.extra.workbench.oddsUnits;
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({});
  });
});
