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

  it('is saved in the workspace and comes back; invalid saved entries are dropped', () => {
    const s = A.setOddsUnit(A.setOddsUnit(createStore().get(), { term: 'age', unit: 10 }), { term: 'bmi', unit: 2.5 });
    const ws = JSON.parse(JSON.stringify(toWorkspace(s, null, false)));
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({ age: 10, bmi: 2.5 });
    ws.extra.workbench.oddsUnits = { age: 10, bad: -1, text: '5', zero: 0 };
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({ age: 10 });
    delete ws.extra.workbench.oddsUnits;
    expect(settingsFromWorkspace(ws).oddsUnits).toEqual({});
  });
});
