import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import { buildDesign, designFromRecipe } from '../../../src/engine/design/design';

const data: Dataset = {
  nRows: 6,
  columns: [
    { kind: 'categorical', name: 'ssi', codes: Int32Array.of(0, 1, 0, 1, 0, -1), levels: ['no', 'yes'] },
    { kind: 'numeric', name: 'age', values: Float64Array.of(50, 61, 72, NaN, 45, 60) },
    { kind: 'categorical', name: 'ward', codes: Int32Array.of(0, 1, 1, 2, 1, 0), levels: ['A', 'B', 'C'] },
  ],
};

describe('buildDesign', () => {
  it('takes the second of two outcome levels as the event, with a warning, and counts dropped rows per column', () => {
    const d = buildDesign(data, {
      outcome: 'ssi',
      terms: [
        { type: 'main', column: 'age' },
        { type: 'main', column: 'ward' },
      ],
    });
    expect(d.recipe.event).toBe('yes');
    expect(d.warnings.map((w) => w.code)).toEqual(['event-level-assumed', 'rows-dropped']);
    expect(Array.from(d.rowsUsed)).toEqual([0, 1, 2, 4]);
    expect(d.droppedByColumn).toEqual({ ssi: 1, age: 1 });
    expect(Array.from(d.y)).toEqual([0, 1, 0, 0]);
    // ward among used rows: A 1, B 3 → reference B (most frequent); C does not occur in the rows used
    expect(d.columnNames).toEqual(['(Intercept)', 'age', 'ward=A']);
    expect(Array.from(d.X.subarray(8, 12))).toEqual([1, 0, 0, 0]);
  });

  it('counts the 0s as events for a numeric outcome with event "0"', () => {
    const d = buildDesign(
      {
        nRows: 4,
        columns: [
          { kind: 'numeric', name: 'y', values: Float64Array.of(0, 1, 1, 0) },
          { kind: 'numeric', name: 'x', values: Float64Array.of(1, 2, 3, 4) },
        ],
      },
      { outcome: 'y', event: '0', terms: [{ type: 'main', column: 'x' }] },
    );
    expect(Array.from(d.y)).toEqual([1, 0, 0, 1]);
  });
});

describe('designFromRecipe', () => {
  const fitted = buildDesign(data, {
    outcome: 'ssi',
    event: 'yes',
    terms: [
      { type: 'main', column: 'age' },
      { type: 'main', column: 'ward', reference: 'A' },
    ],
  });

  it('re-creates the coding on new data whose levels are stored in another order, without an outcome', () => {
    const fresh: Dataset = {
      nRows: 2,
      columns: [
        { kind: 'numeric', name: 'age', values: Float64Array.of(30, 40) },
        { kind: 'categorical', name: 'ward', codes: Int32Array.of(0, 1), levels: ['B', 'A'] },
      ],
    };
    const d = designFromRecipe(fitted.recipe, fresh);
    expect(d.columnNames).toEqual(fitted.columnNames);
    expect(d.y).toBeNull();
    expect(Array.from(d.X)).toEqual([1, 1, 30, 40, 1, 0]);
  });

  it('throws naming row and column for a level the model has not seen', () => {
    const fresh: Dataset = {
      nRows: 2,
      columns: [
        { kind: 'numeric', name: 'age', values: Float64Array.of(30, 40) },
        { kind: 'categorical', name: 'ward', codes: Int32Array.of(0, 1), levels: ['A', 'Z'] },
      ],
    };
    expect(() => designFromRecipe(fitted.recipe, fresh)).toThrow(/Row 3, column "ward": the value "Z"/);
  });
});

describe('designFromRecipe fast paths', () => {
  // Rows without missing values are copied as blocks and a reused buffer is cleared first: the design must be the one
  // the row-by-row path gives (the same rows, given explicitly, take that path).
  it('gives the same design with and without the block copy, and in a reused buffer', () => {
    const n = 7;
    const full: Dataset = {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.of(0, 1, 0, 1, 1, 0, 0) },
        { kind: 'numeric', name: 'x', values: Float64Array.of(1.5, -2, 3, 0.25, 8, 1e-3, 4) },
        { kind: 'categorical', name: 'g', codes: Int32Array.of(0, 1, 2, 1, 0, 2, 1), levels: ['a', 'b', 'c'] },
      ],
    };
    const d = buildDesign(full, {
      outcome: 'y',
      terms: [
        { type: 'main', column: 'x' },
        { type: 'main', column: 'g' },
      ],
    });
    const rows = Int32Array.from({ length: n }, (_, i) => i);
    const gathered = designFromRecipe(d.recipe, full, { rows });
    expect(Array.from(d.X)).toEqual(Array.from(gathered.X));
    const scratch = new Float64Array(n * d.p + 5).fill(7); // stale values must not leak into indicator columns
    const reused = designFromRecipe(d.recipe, full, { scratch });
    expect(reused.X.buffer).toBe(scratch.buffer);
    expect(Array.from(reused.X)).toEqual(Array.from(d.X));
  });
});
