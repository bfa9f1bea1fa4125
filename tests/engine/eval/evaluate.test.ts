import { describe, expect, it } from 'vitest';
import { delongAuc } from '../../../src/engine/evaluation/delong';
import { evaluate } from '../../../src/engine/evaluation/evaluate';
import { atThreshold } from '../../../src/engine/evaluation/threshold';
import { readJson, readNumericCsv } from './readCsv';

// Reference for the Pima numbers: R 4.2.2 (tests/fixtures/reference/eval-calibration.R), see calibration.test.ts.
const ref = readJson('reference/eval-calibration.json');
const d = readNumericCsv('data/eval-pima-te-predictions.csv');

/** Every number in a record, however deeply nested (typed arrays included). */
function numbers(x: unknown, out: number[] = []): number[] {
  if (typeof x === 'number') out.push(x);
  else if (ArrayBuffer.isView(x)) out.push(...Array.from(x as Float64Array));
  else if (Array.isArray(x)) x.forEach((v) => numbers(v, out));
  else if (x && typeof x === 'object') Object.values(x).forEach((v) => numbers(v, out));
  return out;
}

describe('evaluate', () => {
  it(
    'gathers the same Brier, calibration, Hosmer–Lemeshow and DeLong results as the single functions on ' + 'Pima.te',
    () => {
      const r = evaluate(d.y, d.p, { eta: d.lp });
      expect(Math.abs(r.brier.brier! - ref.brier.brier)).toBeLessThan(1e-14);
      expect(Math.abs(r.calibration.slope!.estimate - ref.calibration.slope)).toBeLessThan(1e-8);
      expect(Math.abs(r.calibration.interceptInTheLarge!.estimate - ref.calibration.citl)).toBeLessThan(1e-8);
      expect(Math.abs(r.calibrationCurve.ici! - ref.curve4.ici)).toBeLessThan(1e-8);
      expect(Math.abs(r.hosmerLemeshow!.statistic! - ref.hosmerLemeshow.statistic)).toBeLessThan(1e-10);
      expect(r.hosmerLemeshow!.secondary).toBe(true);
      expect(r.auc).toEqual(delongAuc(d.y, d.p));
      expect(r.n).toBe(ref.n);
      expect(r.events).toBe(ref.events);
      expect(r.decisionCurve.thresholds.length).toBe(99);
      expect(r.warnings).toEqual([]);
    },
  );
  it('uses logit(p) when no linear predictor is given (same slope to 1e-8, since p = plogis(lp))', () => {
    const r = evaluate(d.y, d.p);
    expect(Math.abs(r.calibration.slope!.estimate - ref.calibration.slope)).toBeLessThan(1e-8);
  });
  it('returns a structured-clone-safe record, and the prepared thresholds give the same answer after cloning', () => {
    const r = evaluate(d.y, d.p, { costs: { missedCase: 4, falseAlarm: 1 } });
    const c = structuredClone(r);
    expect(c).toEqual(r);
    expect(r.atThreshold!.threshold).toBeCloseTo(0.2, 15);
    expect(atThreshold(c.prepared!, 0.37)).toEqual(atThreshold(r.prepared!, 0.37));
    expect(r.costs!.thresholds.empirical.expectedCostPer100).toBeLessThanOrEqual(
      Math.min(...r.costs!.curve.costPer100) + 1e-12,
    );
  });
  it('with whole-number (frequency) weights: DeLong interval and Hosmer–Lemeshow of the cases written out', () => {
    // common practice: a row of weight w is w identical cases; the written-out data are the reference
    const r = evaluate(d.y, d.p, { weights: d.w });
    const idx = Array.from(d.w).flatMap((w, i) => new Array<number>(w).fill(i));
    const one = evaluate(
      Float64Array.from(idx, (i) => d.y[i]),
      Float64Array.from(idx, (i) => d.p[i]),
    );
    expect(r.n).toBe(idx.length);
    expect(Math.abs(r.auc.auc! - one.auc.auc!)).toBeLessThan(1e-14);
    expect(Math.abs(r.auc.lower! - one.auc.lower!)).toBeLessThan(1e-12);
    expect(Math.abs(r.auc.upper! - one.auc.upper!)).toBeLessThan(1e-12);
    expect(Math.abs(r.hosmerLemeshow!.statistic! - one.hosmerLemeshow!.statistic!)).toBeLessThan(1e-9);
    expect(r.warnings.map((w) => w.code)).not.toContain('weights-no-delong');
    expect(Math.abs(r.brier.brier! - ref.brierWeighted.brier)).toBeLessThan(1e-14);
  });
  it('leaves out the DeLong interval and Hosmer–Lemeshow with a warning when weights are not whole numbers', () => {
    const r = evaluate(d.y, d.p, { weights: d.w.map((w) => w / 2) });
    expect(r.auc.lower).toBeNull();
    expect(r.auc.auc).toBeGreaterThan(0.5);
    expect(r.hosmerLemeshow).toBeNull();
    expect(r.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['weights-no-delong', 'weights-no-hl']));
  });
  const cases: [string, number[], number[], string][] = [
    ['all risks tied', [0, 1, 0, 1, 0, 0], [0.3, 0.3, 0.3, 0.3, 0.3, 0.3], 'scores-all-tied'],
    ['AUC of exactly 1', [0, 0, 0, 1, 1, 1], [0.1, 0.2, 0.3, 0.7, 0.8, 0.9], 'auc-perfect'],
    ['a single event', [0, 0, 0, 0, 0, 1], [0.1, 0.2, 0.3, 0.4, 0.5, 0.6], 'class-too-small'],
    ['no events at all', [0, 0, 0, 0], [0.1, 0.2, 0.3, 0.4], 'one-class-only'],
  ];
  for (const [label, y, p, code] of cases) {
    it(`does not crash, has no NaN anywhere and warns "${code}" with ${label}`, () => {
      const r = evaluate(Float64Array.from(y), Float64Array.from(p), { costs: { missedCase: 3, falseAlarm: 1 } });
      expect(r.warnings.map((w) => w.code)).toContain(code);
      expect(numbers(r).filter((v) => Number.isNaN(v))).toEqual([]);
    });
  }
  it('handles 200 000 cases (guards against anything quadratic; speed itself is benchmarked elsewhere)', () => {
    const n = 200_000;
    const y = new Float64Array(n);
    const p = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      p[i] = 0.02 + 0.96 * ((i * 0.6180339887) % 1);
      y[i] = (i * 0.7548776662) % 1 < p[i] ? 1 : 0;
    }
    const r = evaluate(y, p);
    expect(r.roc.fpr.length).toBeLessThanOrEqual(500);
    expect(r.auc.auc!).toBeGreaterThan(0.7);
    expect(Math.abs(r.calibration.slope!.estimate - 1)).toBeLessThan(0.1);
  });
});
