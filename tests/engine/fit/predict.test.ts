import { describe, expect, it } from 'vitest';
import { fit } from '../../../src/engine/fitting/fit';
import { predict, predictOne } from '../../../src/engine/fitting/predict';
import { lossSurface } from '../../../src/engine/fitting/lossSurface';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { readCsvDataset, readJson } from './helpers';

// Reference: tests/fixtures/reference/fit-birthwt.json (R 4.2.2 stats::glm on MASS::birthwt).
const ref = readJson('tests/fixtures/reference/fit-birthwt.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const spec: ModelSpec = {
  outcome: 'low',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
    c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
  ),
};
const r = fit(data, spec, { profile: false });

describe('predict', () => {
  it('reproduces the linear predictor of the glm() coefficients and a CI from the covariance', () => {
    const pr = predict(r, data);
    expect(pr.rowsUsed.length).toBe(189);
    // row 1 of birthwt: age 19, lwt 182, race 2, smoke 0, ptl 0, ht 0, ui 1
    const x = [1, 19, 182, 1, 0, 0, 0, 0, 1];
    const eta = x.reduce((s, v, j) => s + v * ref.coef[j], 0);
    expect(pr.eta[0]).toBeCloseTo(eta, 8);
    expect(pr.risk[0]).toBeCloseTo(1 / (1 + Math.exp(-eta)), 9);
    let v = 0;
    for (let a = 0; a < 9; a++) for (let b = 0; b < 9; b++) v += x[a] * x[b] * ref.vcov[a * 9 + b];
    expect(pr.lower[0]).toBeCloseTo(1 / (1 + Math.exp(-(eta - 1.959963984540054 * Math.sqrt(v)))), 7);
    expect(pr.upper[0]).toBeCloseTo(1 / (1 + Math.exp(-(eta + 1.959963984540054 * Math.sqrt(v)))), 7);
  });

  it('scores one case from a plain record, with the category as text or number', () => {
    const one = predictOne(r, { age: 19, lwt: 182, race: '2', smoke: 0, ptl: 0, ht: 0, ui: 1 });
    expect(one.risk).toBeCloseTo(predict(r, data).risk[0], 12);
    expect(predictOne(r, { age: 19, lwt: 182, race: 2, smoke: 0, ptl: 0, ht: 0, ui: 1 }).risk).toBeCloseTo(
      one.risk,
      12,
    );
    expect(() => predictOne(r, { age: 19, lwt: 182, race: '2', smoke: 0, ptl: 0, ht: 0 })).toThrow(/"ui"/);
  });

  it('reads only plain decimals from a typed record: blank is missing, hexadecimal is refused', () => {
    const rec = { age: 19, lwt: 182, race: '2', smoke: 0, ptl: 0, ht: 0, ui: 1 };
    expect(predictOne(r, { ...rec, lwt: '182' }).risk).toBeCloseTo(predictOne(r, rec).risk, 12);
    expect(() => predictOne(r, { ...rec, lwt: '   ' })).toThrow(/No value was given for "lwt"/);
    expect(() => predictOne(r, { ...rec, lwt: '0x10' })).toThrow(/"lwt" must be a plain decimal/);
  });

  it('refuses a value so extreme that the risk score overflows, naming row and column', () => {
    const rec = { age: 19, lwt: 182, race: '2', smoke: 0, ptl: 0, ht: 1.7e308, ui: 1 }; // β_ht ≈ 1.83
    expect(() => predictOne(r, rec)).toThrow(/Row 2: the value of "ht"/);
  });

  it('names row and column of an unseen category and skips rows with a missing predictor', () => {
    const bad: Dataset = {
      nRows: 2,
      columns: [
        ...['age', 'lwt', 'smoke', 'ptl', 'ht', 'ui'].map((name) => ({
          kind: 'numeric' as const,
          name,
          values: Float64Array.of(20, name === 'lwt' ? NaN : 1),
        })),
        { kind: 'categorical', name: 'race', codes: Int32Array.of(0, 1), levels: ['1', '4'] },
      ],
    };
    expect(predict(r, bad).rowsUsed).toEqual(Int32Array.of(0));
    const bad2 = {
      ...bad,
      columns: bad.columns.map((c) => (c.kind === 'numeric' ? { ...c, values: Float64Array.of(20, 100) } : c)),
    };
    expect(() => predict(r, bad2)).toThrow(/Row 3, column "race": the value "4"/);
  });

  it('gives NaN intervals with a warning for a ridge fit', () => {
    const pr = predict(fit(data, spec, { method: 'ridge', lambda: 0.05 }), data);
    expect(Number.isNaN(pr.lower[0])).toBe(true);
    expect(pr.warnings.map((w) => w.code)).toEqual(['no-prediction-interval']);
  });
});

describe('lossSurface', () => {
  it('has its minimum over the grid at the estimate and a path that ends at it', () => {
    const s = lossSurface(r, data, { i: 2, j: 5, grid: 21 });
    expect(s.x.length).toBe(21);
    expect(s.z.length).toBe(441);
    expect(s.minimum).toBeCloseTo(ref.deviance / (2 * 189), 10);
    expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-12);
    expect(s.path.x[0]).toBe(0);
    expect(s.path.x[s.path.x.length - 1]).toBeCloseTo(s.estimate[0], 8);
    expect(s.path.y[s.path.y.length - 1]).toBeCloseTo(s.estimate[1], 8);
    expect(s.z.every(Number.isFinite)).toBe(true);
  });

  it('adds the ridge penalty for ridge fits', () => {
    const rr = fit(data, spec, { method: 'ridge', lambda: 0.05 });
    const s = lossSurface(rr, data, { i: 1, j: 2, grid: 11 });
    expect(s.objective).toBe('cross-entropy+ridge');
    expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-12);
  });
});

describe('lossSurface (Firth)', () => {
  it("includes Firth's penalty so that the estimate is the grid minimum", () => {
    const rf = fit(data, spec, { method: 'firth', profile: false });
    const s = lossSurface(rf, data, { i: 1, j: 7, grid: 15 });
    expect(s.objective).toBe('cross-entropy+firth');
    expect(Math.min(...s.z)).toBeGreaterThanOrEqual(s.minimum - 1e-12);
    expect(s.path.x[s.path.x.length - 1]).toBeCloseTo(s.estimate[0], 8);
  });
});
