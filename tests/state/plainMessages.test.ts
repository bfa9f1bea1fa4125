import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { fit } from '../../src/engine/fitting/fit';
import { importText } from '../../src/io/index';
import * as A from '../../src/state/actions';
import { initialState } from '../../src/state/appState';
import { surfacePair } from '../../src/state/effects/fitting';
import { loadImported } from '../../src/worker/dataOps';
import { createSession } from '../../src/worker/session';

const failure = async (run: () => unknown) => {
  try {
    await run();
  } catch (e) {
    return e as FulcraError;
  }
  return null;
};

describe('plain messages for hostile inputs', () => {
  it('says the outcome has one value instead of asking for an event from an empty list', async () => {
    const s = createSession();
    const summary = loadImported(s, await importText('y\tx\nno\t1\nno\t2\nno\t3\n\t4\n'), 'paste', 'pasted cells');
    const state = A.chooseOutcome(A.dataLoaded(initialState, summary), { column: 'y' });
    const built = A.buildSpec(state);
    expect('problem' in built && built.problem).toBe(
      'The outcome "y" has one value: every row with a value is "no". A risk model needs rows with and without ' +
        'the event; choose another outcome column, or check that the file holds both kinds of row.',
    );
  });

  it('draws the loss surface over the first two coefficients that are not aliased', () => {
    const c = (name: string, aliased = false) => ({ name, aliased });
    expect(surfacePair([c('(Intercept)'), c('x1'), c('x1copy', true), c('x2')])).toEqual([1, 3]);
    expect(surfacePair([c('(Intercept)'), c('x1'), c('x1copy', true)])).toBeNull();
  });

  it('names the rows left out when a ragged file leaves too few rows to fit', async () => {
    const lines = ['y,a,b,c'];
    // Rows 2 and 3 are complete (both events); rows 4 to 31 are short: only y and a.
    lines.push('1,2,3,4', '1,5,6,7');
    for (let i = 2; i < 30; i++) lines.push(`${i % 2},${i}`);
    const data = (await importText(lines.join('\n'))).dataset;
    const spec = {
      outcome: 'y',
      event: '1',
      terms: ['a', 'b', 'c'].map((column) => ({ type: 'main' as const, column })),
    };
    const e = await failure(() => fit(data, spec, { profile: false }));
    expect(e?.message).toContain('Only 2 of the 30 rows have a value in every column the model uses');
    expect(e?.message).toContain('28 rows were left out for missing values: rows 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, …');
    expect(e?.suggestion).toContain('fewer cells than the header');
  });

  it('calls pasted control characters what they are, not a binary file to save as .xlsx', async () => {
    const e = await failure(() => importText('a\tb\n1\t\u00002\n3\t4\n'));
    expect(e?.code).toBe('not-text');
    expect(e?.message).toBe(
      'The pasted cells contain a control character (U+0000) in row 2, column 2, which a spreadsheet cell does ' +
        'not hold: the text was probably copied from another program than a spreadsheet.',
    );
    expect(e?.suggestion).not.toMatch(/xlsx/);
  });
});
