import { describe, expect, it } from 'vitest';
import type { CategoricalColumn, NumericColumn } from '../../src/engine/core/data';
import { proposeOutcomeEvent } from '../../src/io/index';

const catCol = (values: (string | null)[]): CategoricalColumn => {
  const levels = [...new Set(values.filter((v): v is string => v !== null))].sort();
  return {
    kind: 'categorical',
    name: 'y',
    levels,
    codes: Int32Array.from(values, (v) => (v === null ? -1 : levels.indexOf(v))),
  };
};
const numCol = (values: number[]): NumericColumn => ({ kind: 'numeric', name: 'y', values: Float64Array.from(values) });

describe('proposeOutcomeEvent', () => {
  it.each([
    [['yes', 'no'], 'yes'],
    [['No', 'YES'], 'YES'],
    [['Y', 'N'], 'Y'],
    [['true', 'false'], 'true'],
    [['1', '0'], '1'],
    [['negative', 'positive'], 'positive'],
    [['infected', 'not infected'], 'infected'],
    [['fail', 'pass'], 'fail'],
    [['complication', 'no complication'], 'complication'],
  ])('proposes the event of %j: %s', (values, event) => {
    const p = proposeOutcomeEvent(catCol([...values, values[0], null]));
    expect(p).toMatchObject({ status: 'proposed', event });
  });

  it('proposes 1 for a numeric 0/1 column', () => {
    expect(proposeOutcomeEvent(numCol([0, 1, 1, NaN, 0]))).toMatchObject({
      status: 'proposed',
      event: '1',
      nonEvent: '0',
    });
  });

  it('asks when two values are not a known pair, or when there are more than two', () => {
    expect(proposeOutcomeEvent(catCol(['A', 'B']))).toMatchObject({ status: 'needsChoice', levels: ['A', 'B'] });
    expect(proposeOutcomeEvent(numCol([1, 2, 1]))).toMatchObject({ status: 'needsChoice', levels: ['1', '2'] });
    expect(proposeOutcomeEvent(catCol(['mild', 'severe', 'none']))).toMatchObject({
      status: 'needsChoice',
      levels: ['mild', 'none', 'severe'],
    });
    // "non-union" is the complication itself, so a hyphenated "non-" is not read as a negation.
    expect(proposeOutcomeEvent(catCol(['non-union', 'union'])).status).toBe('needsChoice');
    // "infected" with "not infected" AND a third value is ambiguous: no automatic proposal.
    expect(proposeOutcomeEvent(catCol(['infected', 'not infected', 'unknown'])).status).toBe('needsChoice');
  });

  it('calls a one-class, empty or many-valued numeric column unsuitable, with the reason', () => {
    const one = proposeOutcomeEvent(catCol(['yes', 'yes', null]));
    expect(one.status).toBe('unsuitable');
    expect(one.reason).toContain('"yes"');
    expect(proposeOutcomeEvent(catCol([null, null])).status).toBe('unsuitable');
    expect(proposeOutcomeEvent(numCol([1.2, 3.4, 5.6])).status).toBe('unsuitable');
  });
});
