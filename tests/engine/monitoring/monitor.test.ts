import { describe, expect, it } from 'vitest';
import { FulcraError, type Dataset } from '../../../src/engine/core';
import { calibrationRegression } from '../../../src/engine/evaluation';
import {
  citlFit,
  decimatePath,
  monitorCases,
  periodOf,
  recalibrateOnPeriods,
  resolveMonitoringOptions,
  scoreMonitoring,
  slopeFit,
} from '../../../src/engine/monitoring';
import { recalibrate, type ScoringModel } from '../../../src/engine/validation';
import { createRng } from '../../../src/engine/numerics';

function simulated(n: number, seed: number, shift = 0) {
  const rng = createRng(seed);
  const eta = Float64Array.from({ length: n }, () => -2 + 0.8 * rng.normal());
  const risk = eta.map((e) => 1 / (1 + Math.exp(-e)));
  const y = eta.map((e) => (rng.next() < 1 / (1 + Math.exp(-(e + shift))) ? 1 : 0));
  const date = Float64Array.from({ length: n }, (_, i) => 20089 + Math.floor((i * 365) / n));
  return { y, eta, risk, date, unit: null, unitLevels: [], row: Int32Array.from({ length: n }, (_, i) => i + 2) };
}

describe('monitoring options', () => {
  it('fills the defaults (odds ratios 2 and 0.5, funnel levels 0.95 and 0.998)', () => {
    const o = resolveMonitoringOptions({ dateColumn: 'date' });
    expect(o.oddsRatio).toEqual({ deteriorate: 2, improve: 0.5 });
    expect(o.funnelLevels).toEqual([0.95, 0.998]);
    expect(o.period).toBe('month');
  });

  it('rejects a bad value naming the option', () => {
    const bad = (x: object) => () => resolveMonitoringOptions({ dateColumn: 'd', ...x });
    expect(bad({ targetArl0: 3 })).toThrow(/targetArl0/);
    expect(bad({ oddsRatio: { deteriorate: 0.8 } })).toThrow(/oddsRatio\.deteriorate/);
    expect(bad({ period: 'week' })).toThrow(/period/);
    expect(bad({ funnelLevels: [0.998, 0.95] })).toThrow(FulcraError);
    expect(bad({ colour: 'red' })).toThrow(/not a monitoring option/);
  });
});

describe('calibration on monitoring cases', () => {
  // Reference: the engine's calibrationRegression (glm-based, itself checked against R 4.2.2 glm in
  // tests/engine/eval); the monitoring fits are a faster Newton for the same likelihoods.
  it('gives the calibration-in-the-large and slope of calibrationRegression to 1e-8', () => {
    const c = simulated(3000, 5, 0.3);
    const ref = calibrationRegression(c.y, c.eta, { level: 0.95 });
    const citl = citlFit(c.y, c.eta, 0.95)!,
      slope = slopeFit(c.y, c.eta, 0.95)!;
    expect(citl.estimate).toBeCloseTo(ref.interceptInTheLarge!.estimate, 8);
    expect(citl.se).toBeCloseTo(ref.interceptInTheLarge!.se, 8);
    expect(slope.slope.estimate).toBeCloseTo(ref.slope!.estimate, 8);
    expect(slope.slope.upper).toBeCloseTo(ref.slope!.upper, 8);
  });
});

describe('monitorCases', () => {
  const c = simulated(4000, 9);
  const o = resolveMonitoringOptions({ dateColumn: 'd', targetArl0: 500, simulationRuns: 100 });
  const info = { source: 'current-fit' as const, name: 'm', outcome: 'y', event: '1' };
  const scoring = {
    nRows: 4000,
    unscored: [],
    unscoredByReason: {
      'missing-value': 0,
      'unknown-category': 0,
      'missing-outcome': 0,
      'missing-date': 0,
      'missing-unit': 0,
    },
  };
  const r = monitorCases(c, o, info, scoring);

  it('sums O and E over every case and ends the cumulative O − E at O − E', () => {
    const O = c.y.reduce((s, v) => s + v, 0),
      E = c.risk.reduce((s, v) => s + v, 0);
    expect(r.overall.observed).toBe(O);
    expect(r.overall.expected).toBeCloseTo(E, 9);
    expect(r.vlad.final).toBeCloseTo(O - E, 9);
    expect(r.vlad.path.value.at(-1)).toBeCloseTo(O - E, 9);
  });

  it('has one row per month whose counts add up to the whole', () => {
    expect(r.periods.map((p) => p.label)).toEqual(
      Array.from({ length: 12 }, (_, m) => `2025-${String(m + 1).padStart(2, '0')}`),
    );
    expect(r.periods.reduce((s, p) => s + p.n, 0)).toBe(4000);
  });

  it('keeps every signal at full resolution while the drawn path is decimated', () => {
    const big = monitorCases(simulated(20000, 3, 0.7), o, info, { ...scoring, nRows: 20000 });
    const ch = big.cusum.deteriorate;
    expect(ch.signals.length).toBeGreaterThan(3);
    expect(ch.path.case.length).toBeLessThanOrEqual(o.drawPoints + 2);
    for (const s of ch.signals) expect(s.value).toBeGreaterThanOrEqual(ch.h);
  });
});

describe('decimatePath', () => {
  it('keeps the bucket maxima (the peaks) and the last point', () => {
    const v = Float64Array.from({ length: 10000 }, (_, i) => (i === 4321 ? 9 : Math.sin(i / 50)));
    const p = decimatePath(v, new Float64Array(10000), 200);
    expect(p.value).toContain(9);
    expect(p.case).toContain(4322);
    expect(p.case.at(-1)).toBe(10000);
    expect(p.case.length).toBeLessThanOrEqual(202);
  });
});

describe('periods', () => {
  it('labels months and quarters from epoch days (common practice: calendar quarters Jan–Mar …)', () => {
    const day = Date.UTC(2025, 4, 17) / 86_400_000;
    expect(periodOf(day, 'month')).toEqual({
      label: '2025-05',
      start: Date.UTC(2025, 4, 1) / 864e5,
      end: Date.UTC(2025, 5, 1) / 864e5,
    });
    expect(periodOf(day, 'quarter').label).toBe('2025 Q2');
  });
});

describe('scoring a monitoring file', () => {
  const model: ScoringModel = {
    recipe: {
      outcome: 'y',
      event: '1',
      terms: [
        { type: 'numeric', name: 'x', column: 'x' },
        { type: 'categorical', name: 'g', column: 'g', levels: ['a', 'b'], reference: 'a' },
      ],
      columnNames: ['(Intercept)', 'x', 'g=b'],
    },
    coefficients: [
      { name: '(Intercept)', estimate: -1 },
      { name: 'x', estimate: 0.5 },
      { name: 'g=b', estimate: 0.3 },
    ],
  };
  const data: Dataset = {
    nRows: 5,
    columns: [
      { kind: 'numeric', name: 'x', values: Float64Array.from([1, NaN, 2, 3, 0]) },
      { kind: 'categorical', name: 'g', levels: ['a', 'b', 'c'], codes: Int32Array.from([0, 1, 2, 1, 0]) },
      { kind: 'numeric', name: 'y', values: Float64Array.from([0, 1, 1, 0, 1]) },
    ],
  };
  const dates = Float64Array.from([20100, 20101, 20102, NaN, 20099]);

  it('lists missing values, unseen categories and missing dates by spreadsheet row instead of throwing', () => {
    const { cases, summary } = scoreMonitoring(model, data, dates, null, { date: 'when', unit: null });
    expect(summary.unscored).toEqual([
      { row: 3, reason: 'missing-value', column: 'x', value: null },
      { row: 4, reason: 'unknown-category', column: 'g', value: 'c' },
      { row: 5, reason: 'missing-date', column: 'when', value: null },
    ]);
    // Sorted by date: row 6 (day 20099) before row 2 (day 20100).
    expect([...cases.row]).toEqual([6, 2]);
    expect(cases.eta[1]).toBeCloseTo(-1 + 0.5 * 1, 12);
  });
});

describe('recalibrateOnPeriods', () => {
  // Reference: the engine's recalibrate (validation/recalibration.ts, checked against R glm elsewhere) on the
  // same cases.
  it('recalibrates on the cases of the latest k months only', () => {
    const c = simulated(6000, 21, 0.5);
    const model: ScoringModel = {
      recipe: { outcome: 'y', event: '1', terms: [], columnNames: ['(Intercept)'] },
      coefficients: [{ name: '(Intercept)', estimate: -2 }],
    };
    const r = recalibrateOnPeriods(model, c, 'month', { periods: 3 });
    expect(r.periods).toEqual(['2025-10', '2025-11', '2025-12']);
    const from = c.date.findIndex((d) => d >= Date.UTC(2025, 9, 1) / 864e5);
    const ref = recalibrate(c.y.subarray(from), c.eta.subarray(from));
    expect(r.nUsed).toBe(6000 - from);
    expect(r.intercept!.estimate).toBeCloseTo(ref.interceptSlope!.intercept.estimate, 10);
    expect(r.model!.coefficients[0].estimate).toBeCloseTo(
      ref.interceptSlope!.intercept.estimate + ref.interceptSlope!.slope!.estimate * -2,
      10,
    );
    expect(() => recalibrateOnPeriods(model, c, 'month', { periods: 13 })).toThrow(/has 12/);
  });
});
