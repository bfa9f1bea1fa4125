import { describe, expect, it } from 'vitest';
import { ordinal, plural, type Dataset, type NumericColumn } from '../../src/engine/core';
import { fit } from '../../src/engine/fitting/fit';
import { predict } from '../../src/engine/fitting/predict';
import { plural as ioPlural } from '../../src/io/rows';
import { birthwtSpec, loadBirthwt } from './birthwtRecord';

describe('wording helpers', () => {
  it('writes the singular only for exactly one', () => {
    expect(plural(1, 'row')).toBe('1 row');
    expect(plural(0, 'row')).toBe('0 rows');
    expect(plural(2, 'case')).toBe('2 cases');
    expect(plural(1204, 'cell is', 'cells are')).toBe('1,204 cells are');
    expect(plural(1, 'cell is', 'cells are')).toBe('1 cell is');
    expect(ioPlural).toBe(plural);
  });

  it('writes English ordinals', () => {
    const cases: [number, string][] = [
      [1, '1st'],
      [2, '2nd'],
      [3, '3rd'],
      [4, '4th'],
      [11, '11th'],
      [12, '12th'],
      [13, '13th'],
      [21, '21st'],
      [22, '22nd'],
      [23, '23rd'],
      [101, '101st'],
      [111, '111th'],
      [112, '112th'],
      [0, '0th'],
    ];
    for (const [n, text] of cases) expect(ordinal(n)).toBe(text);
  });
});

describe('counts in engine messages', () => {
  it('says "1 row was" for one dropped row, "2 rows were" for two', () => {
    const data = loadBirthwt();
    const lwt = data.columns.find((c) => c.name === 'lwt') as NumericColumn;
    const withMissing = (k: number): Dataset => {
      const values = Float64Array.from(lwt.values);
      for (let i = 0; i < k; i++) values[i] = NaN;
      return { ...data, columns: data.columns.map((c) => (c === lwt ? { ...c, values } : c)) } as Dataset;
    };
    const one = fit(withMissing(1), birthwtSpec);
    const oneText = one.warnings.map((w) => w.message).join(' ');
    expect(oneText).toContain('1 of 189 rows was left out');
    expect(
      predict(one, withMissing(1))
        .warnings.map((w) => w.message)
        .join(' '),
    ).toContain('1 row was not scored');
    const two = fit(withMissing(2), birthwtSpec);
    expect(two.warnings.map((w) => w.message).join(' ')).toContain('2 of 189 rows were left out');
    expect(oneText).not.toMatch(/\b1 rows\b/);
  });
});
