import { describe, expect, it } from 'vitest';
import { FulcraError, type Dataset } from '../../../src/engine/core/data';
import { bandLabels, checkCutPoints, subgroupsFromColumn } from '../../../src/engine/subgroups';

const all = (n: number) => Int32Array.from({ length: n }, (_, i) => i);
const ages = [35, 40, 59.9, 60, 79, 80, 95, NaN, 12, 61];
const data: Dataset = {
  nRows: ages.length,
  columns: [
    { kind: 'numeric', name: 'age', values: Float64Array.from(ages) },
    {
      kind: 'categorical',
      name: 'ward',
      levels: ['A', 'B', 'C'],
      codes: Int32Array.from([0, 1, 0, -1, 1, 0, 0, 1, 0, 1]),
    },
    { kind: 'numeric', name: 'grade', values: Float64Array.from([3, 1, 2, 1, 3, 3, 2, 1, 1, 2]) },
  ],
};

function thrown(f: () => unknown): FulcraError {
  try {
    f();
  } catch (e) {
    return e as FulcraError;
  }
  throw new Error('did not throw');
}

describe('subgroups from a numeric column cut at cut points', () => {
  it('labels bands closed on the left: "< 40", "40 to < 60", "60 to < 80", "≥ 80"', () => {
    // Source: the interval convention Fulcra states (as R cut(right = FALSE)); 59.9 falls below 60, 60 in "60 to < 80".
    expect(bandLabels('age', [40, 60, 80]).map((b) => b.label)).toEqual(['< 40', '40 to < 60', '60 to < 80', '≥ 80']);
    const g = subgroupsFromColumn(data, { column: 'age', cutPoints: [40, 60, 80] }, all(10));
    expect(g.kind).toBe('bands');
    expect(g.groups.map((x) => [x.label, x.n])).toEqual([
      ['< 40', 2],
      ['40 to < 60', 2],
      ['60 to < 80', 3],
      ['≥ 80', 2],
      ['(missing)', 1],
    ]);
    expect(Array.from(g.groupOf)).toEqual([0, 1, 1, 2, 2, 3, 3, 4, 0, 2]);
    expect(g.groups[1].definition).toBe('age: 40 ≤ value < 60');
    expect(g.conventions.join(' ')).toMatch(/closed on the left/);
  });

  it('follows rowsUsed: only the used rows, in their order, and lists bands left empty', () => {
    // Source: hand count of the rows 6, 0, 8 (ages 95, 35, 12).
    const g = subgroupsFromColumn(data, { column: 'age', cutPoints: [40, 60, 80] }, Int32Array.from([6, 0, 8]));
    expect(g.groups.map((x) => [x.label, x.n])).toEqual([
      ['< 40', 2],
      ['≥ 80', 1],
    ]);
    expect(Array.from(g.groupOf)).toEqual([1, 0, 0]);
    expect(g.emptyGroups).toEqual(['40 to < 60', '60 to < 80']);
  });

  it('refuses unsorted cut points, naming the column, the value out of order and the sorted list', () => {
    const e = thrown(() => subgroupsFromColumn(data, { column: 'age', cutPoints: [40, 80, 60] }, all(10)));
    expect(e.code).toBe('bad-cut-points');
    expect(e.message).toBe('The cut points for column "age" must be in increasing order, but 60 comes after 80.');
    expect(e.suggestion).toBe('Give them in increasing order: 40, 60, 80.');
  });

  it('refuses a repeated cut point and a cut point that is not a number', () => {
    const dup = thrown(() => checkCutPoints('age', [40, 60, 60, 80]));
    expect(dup.message).toBe('The cut point 60 for column "age" is given twice; each cut point must appear once.');
    expect(dup.suggestion).toBe('Remove the repeated value: 40, 60, 80.');
    const nan = thrown(() => checkCutPoints('age', [40, NaN]));
    expect(nan.message).toMatch(/column "age" must be finite numbers; cut point number 2 is NaN/);
  });

  it('refuses cut points on a categorical column', () => {
    const e = thrown(() => subgroupsFromColumn(data, { column: 'ward', cutPoints: [1] }, all(10)));
    expect(e.code).toBe('bad-cut-points');
    expect(e.message).toMatch(/Column "ward" holds categories/);
  });
});

describe('subgroups from levels and distinct values', () => {
  it('makes one group per level present, missing cells last as "(missing)", empty levels listed', () => {
    // Source: hand count of the ward column (A ×5, B ×4, one missing; C unused).
    const g = subgroupsFromColumn(data, { column: 'ward' }, all(10));
    expect(g.groups.map((x) => [x.label, x.n, x.missing])).toEqual([
      ['A', 5, false],
      ['B', 4, false],
      ['(missing)', 1, true],
    ]);
    expect(g.emptyGroups).toEqual(['C']);
    expect(g.groups[0].definition).toBe('ward = "A"');
    expect(g.groups[2].definition).toBe('ward is missing');
  });

  it('does not reuse the label "(missing)" when a real level has it', () => {
    const d: Dataset = {
      nRows: 2,
      columns: [{ kind: 'categorical', name: 'x', levels: ['(missing)'], codes: Int32Array.from([0, -1]) }],
    };
    expect(subgroupsFromColumn(d, { column: 'x' }, all(2)).groups.map((x) => x.label)).toEqual([
      '(missing)',
      '(missing 2)',
    ]);
  });

  it('uses the distinct values of a numeric column in increasing order without cut points', () => {
    const g = subgroupsFromColumn(data, { column: 'grade' }, all(10));
    expect(g.groups.map((x) => [x.label, x.n])).toEqual([
      ['1', 4],
      ['2', 3],
      ['3', 3],
    ]);
  });

  it('refuses a numeric column with more than 50 distinct values, naming the column and suggesting cut points', () => {
    const n = 120;
    const d: Dataset = {
      nRows: n,
      columns: [{ kind: 'numeric', name: 'weight', values: Float64Array.from({ length: n }, (_, i) => 40 + i) }],
    };
    const e = thrown(() => subgroupsFromColumn(d, { column: 'weight' }, all(n)));
    expect(e.code).toBe('too-many-subgroups');
    expect(e.message).toMatch(/^Column "weight" gives 120 groups among the rows used, more than the 50 allowed/);
    // Quartiles by R type 7 of 40..159: 69.75, 99.5, 129.25, rounded to 2 significant digits: 70, 100, 130.
    expect(e.suggestion).toBe('Give cut points for "weight" (e.g. 70, 100, 130) to group it into bands.');
    expect(subgroupsFromColumn(d, { column: 'weight', cutPoints: [70, 100, 130] }, all(n)).groups).toHaveLength(4);
  });

  it('refuses a categorical column with too many levels, counting the missing group', () => {
    const levels = Array.from({ length: 50 }, (_, i) => `L${i}`);
    const d: Dataset = {
      nRows: 51,
      columns: [{ kind: 'categorical', name: 'site', levels, codes: Int32Array.from({ length: 51 }, (_, i) => i - 1) }],
    };
    const e = thrown(() => subgroupsFromColumn(d, { column: 'site' }, all(51)));
    expect(e.message).toMatch(/Column "site" gives 51 groups/);
    expect(e.suggestion).toMatch(/merge the categories of "site"/);
    expect(
      subgroupsFromColumn(
        d,
        { column: 'site' },
        all(50).map((i) => i + 1),
      ).groups,
    ).toHaveLength(50);
  });

  it('refuses an unknown column and a row index outside the dataset', () => {
    expect(thrown(() => subgroupsFromColumn(data, { column: 'sex' }, all(10))).code).toBe('unknown-column');
    const e = thrown(() => subgroupsFromColumn(data, { column: 'ward' }, Int32Array.from([0, 10])));
    expect(e.message).toBe('Used row number 2 points at data row index 10, but the dataset has 10 rows.');
  });

  it('is structured-clone safe', () => {
    const g = subgroupsFromColumn(data, { column: 'age', cutPoints: [40] }, all(10));
    expect(structuredClone(g)).toEqual(g);
  });
});
