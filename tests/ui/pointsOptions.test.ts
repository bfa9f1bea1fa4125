import { describe, expect, it } from 'vitest';
import { pointsOptionsOf } from '../../src/ui/panels/PointsPanel';

const base = { unit: 'auto' as const, widest: '10', column: 'age', increase: '5', logOdds: '0.25', ranges: '5' };

describe('the points view: typed base unit → engine options', () => {
  it('gives each of the three base units the engine knows', () => {
    expect(pointsOptionsOf(base)).toEqual({
      options: { baseUnit: { kind: 'auto' }, rangesPerTerm: 5, widestTermPoints: 10 },
    });
    expect(pointsOptionsOf({ ...base, unit: 'per-increase', increase: '10' })).toEqual({
      options: { baseUnit: { kind: 'per-increase', column: 'age', increase: 10 }, rangesPerTerm: 5 },
    });
    expect(pointsOptionsOf({ ...base, unit: 'log-odds', logOdds: '0.3' })).toEqual({
      options: { baseUnit: { kind: 'log-odds', value: 0.3 }, rangesPerTerm: 5 },
    });
  });

  it('names a box that is not a number (the engine then checks the range of the value)', () => {
    const r = pointsOptionsOf({ ...base, unit: 'per-increase', increase: 'ten' });
    expect(r).toEqual({ problem: expect.objectContaining({ message: '“ten” in the increase is not a number.' }) });
    expect(pointsOptionsOf({ ...base, ranges: '' })).toHaveProperty('problem');
  });
});
