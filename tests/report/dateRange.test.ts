import { describe, expect, it } from 'vitest';
import { dateRangeOf } from '../../src/report/dateRange';

describe('dateRangeOf', () => {
  it('gives the first and last ISO date of an epoch-day column, ignoring missing cells and the time of day', () => {
    // 2024-01-03 is day 19725 since 1970-01-01 (Date.UTC(2024, 0, 3) / 86400000); 19 722.75 is 2023-12-31 18:00
    const data = {
      nRows: 4,
      columns: [{ kind: 'numeric' as const, name: 'admitted', values: Float64Array.of(19725, NaN, 19722.75, 20087) }],
    };
    expect(Date.UTC(2024, 0, 3) / 86_400_000).toBe(19725);
    expect(dateRangeOf(data, 'admitted')).toEqual({ column: 'admitted', from: '2023-12-31', to: '2024-12-30' });
  });

  it('is null for a missing, categorical or empty column', () => {
    const data = {
      nRows: 1,
      columns: [
        { kind: 'categorical' as const, name: 'ward', codes: Int32Array.of(0), levels: ['A'] },
        { kind: 'numeric' as const, name: 'd', values: Float64Array.of(NaN) },
      ],
    };
    expect(dateRangeOf(data, 'nope')).toBeNull();
    expect(dateRangeOf(data, 'ward')).toBeNull();
    expect(dateRangeOf(data, 'd')).toBeNull();
  });
});
