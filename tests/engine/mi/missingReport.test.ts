import { describe, expect, it } from 'vitest';
import { missingReport, modelColumns } from '../../../src/engine/imputation/missingReport';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { birthwtIncomplete, loadPoolFixture } from './helpers';

const spec: ModelSpec = {
  outcome: 'low',
  event: '1',
  terms: ['age', 'lwt', 'race', 'smoke'].map((column) => ({ type: 'main' as const, column })),
};

describe('missingReport', () => {
  it(
    'counts missing values per column and complete rows as R is.na()/complete.cases() do on the incomplete ' +
      'birthwt data',
    () => {
      const fx = loadPoolFixture(); // R 4.2.2 sum(is.na()), sum(complete.cases()) in mi-pool.R
      const r = missingReport(birthwtIncomplete(), spec);
      expect(r.columns).toEqual(['low', 'age', 'lwt', 'race', 'smoke']);
      expect(r.byColumn.map((c) => c.missing)).toEqual([0, 0, fx.missing.lwt, fx.missing.race, fx.missing.smoke]);
      expect(r.completeRows).toBe(fx.missing.completeRows);
      expect(r.droppedRows).toBe(189 - fx.missing.completeRows);
      expect(r.patterns.reduce((s, p) => s + p.rows, 0)).toBe(189);
      expect(r.patterns[0]).toEqual({ missing: [false, false, false, false, false], rows: fx.missing.completeRows });
    },
  );

  it('warns that complete-case analysis assumes MCAR, naming the incomplete columns, when rows are dropped', () => {
    const r = missingReport(birthwtIncomplete(), spec);
    expect(r.warnings.map((w) => w.code)).toEqual(['complete-case-mcar']);
    expect(r.warnings[0].terms).toEqual(['lwt', 'race', 'smoke']);
    expect(r.warnings[0].message).toMatch(/missing completely at random/);
    expect(r.warnings[0].message).toMatch(/depends only on the predictors/);
    expect(r.warnings[0].message).toMatch(/not the intercept/);
  });

  it('counts rows dropped only because of one column and patterns of a small hand-made table', () => {
    const data: Dataset = {
      nRows: 5,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.from([0, 1, NaN, 1, 0]) },
        { kind: 'numeric', name: 'x', values: Float64Array.from([1, NaN, NaN, 2, NaN]) },
        { kind: 'categorical', name: 'g', codes: Int32Array.from([0, 1, -1, -1, 0]), levels: ['a', 'b'] },
      ],
    };
    const r = missingReport(data, {
      outcome: 'y',
      terms: [
        { type: 'interaction', columns: ['x', 'g'] },
        { type: 'main', column: 'x' },
      ],
    });
    expect(r.columns).toEqual(['y', 'x', 'g']);
    expect(r.byColumn).toEqual([
      { column: 'y', missing: 1, onlyThisMissing: 0, fraction: 0.2 },
      { column: 'x', missing: 3, onlyThisMissing: 2, fraction: 0.6 },
      { column: 'g', missing: 2, onlyThisMissing: 1, fraction: 0.4 },
    ]);
    expect(r.completeRows).toBe(1);
    expect(r.patterns).toEqual(
      [
        { missing: [false, true, false], rows: 2 },
        { missing: [false, false, false], rows: 1 },
        { missing: [true, true, true], rows: 1 },
        { missing: [false, false, true], rows: 1 },
      ].sort((a, b) => b.rows - a.rows || a.missing.filter(Boolean).length - b.missing.filter(Boolean).length),
    );
  });

  it('gives no warning when nothing is missing and a second warning when no row is complete', () => {
    const full: Dataset = {
      nRows: 2,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.from([0, 1]) },
        { kind: 'numeric', name: 'x', values: Float64Array.from([1, 2]) },
      ],
    };
    expect(missingReport(full, { outcome: 'y', terms: [{ type: 'main', column: 'x' }] }).warnings).toEqual([]);
    const none: Dataset = {
      nRows: 2,
      columns: [
        { kind: 'numeric', name: 'y', values: Float64Array.from([0, NaN]) },
        { kind: 'numeric', name: 'x', values: Float64Array.from([NaN, 2]) },
      ],
    };
    const r = missingReport(none, { outcome: 'y', terms: [{ type: 'main', column: 'x' }] });
    expect(r.completeRows).toBe(0);
    expect(r.warnings.map((w) => w.code)).toEqual(['no-complete-rows', 'complete-case-mcar']);
  });

  it('lists spline and interaction columns once each', () => {
    expect(
      modelColumns({
        outcome: 'y',
        terms: [
          { type: 'spline', column: 'a', knots: 3 },
          { type: 'interaction', columns: ['a', 'b'] },
        ],
      }),
    ).toEqual(['y', 'a', 'b']);
  });

  it('throws naming the column when the spec uses a column the data lack', () => {
    expect(() =>
      missingReport(birthwtIncomplete(), { outcome: 'low', terms: [{ type: 'main', column: 'weight' }] }),
    ).toThrow(/weight/);
  });
});
