import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  atThreshold,
  costThresholds,
  decisionTheoryThreshold,
  expectedCostCurve,
  likelihoodRatioCi,
  prepareThresholds,
} from '../../../src/engine/evaluation/threshold';
import { readJson } from './readCsv';
import { rocCurve } from '../../../src/engine/evaluation/roc';

const brute = (y: Float64Array, p: Float64Array, t: number, w?: Float64Array) => {
  let tp = 0,
    fp = 0,
    fn = 0,
    tn = 0;
  for (let i = 0; i < y.length; i++) {
    const wi = w ? w[i] : 1;
    const flag = p[i] >= t;
    if (y[i] === 1) {
      if (flag) tp += wi;
      else fn += wi;
    } else if (flag) fp += wi;
    else tn += wi;
  }
  return { tp, fp, fn, tn };
};

const sample = fc.array(
  fc.record({
    y: fc.constantFrom(0, 1),
    p: fc.integer({ min: 0, max: 20 }).map((k) => k / 20),
    w: fc.integer({ min: 0, max: 4 }),
  }),
  { minLength: 1, maxLength: 60 },
);

describe('prepared thresholds (flag rule: risk ≥ threshold)', () => {
  it('gives the same confusion matrix as a brute-force count at any threshold (property)', () => {
    fc.assert(
      fc.property(sample, fc.double({ min: -0.1, max: 1.1, noNaN: true }), fc.boolean(), (rows, t, weighted) => {
        const y = Float64Array.from(rows, (r) => r.y);
        const p = Float64Array.from(rows, (r) => r.p);
        const w = weighted ? Float64Array.from(rows, (r) => r.w) : undefined;
        fc.pre(!w || w.some((x) => x > 0)); // all-zero weights are refused (bad-weight)
        const prep = prepareThresholds(y, p, w);
        for (const tt of [t, p[0], p[rows.length - 1]]) {
          const m = atThreshold(prep, tt);
          const b = brute(y, p, tt, w);
          expect([m.tp, m.fp, m.fn, m.tn]).toEqual([b.tp, b.fp, b.fn, b.tn]);
        }
      }),
      { numRuns: 300 },
    );
  });
  it('finds the empirically cheapest threshold that a brute-force scan over all cut points finds (property)', () => {
    fc.assert(
      fc.property(sample, fc.integer({ min: 1, max: 10 }), fc.integer({ min: 1, max: 10 }), (rows, cfn, cfp) => {
        const y = Float64Array.from(rows, (r) => r.y);
        const p = Float64Array.from(rows, (r) => r.p);
        const costs = { missedCase: cfn, falseAlarm: cfp };
        const res = costThresholds(prepareThresholds(y, p), costs);
        let best = Infinity;
        for (const t of [...Array.from(p), 2]) {
          const b = brute(y, p, t);
          best = Math.min(best, (100 * (cfn * b.fn + cfp * b.fp)) / y.length);
        }
        expect(res.empirical.expectedCostPer100).toBeCloseTo(best, 10);
        const at = brute(y, p, res.empirical.threshold ?? 2);
        expect((100 * (cfn * at.fn + cfp * at.fp)) / y.length).toBeCloseTo(best, 10);
      }),
      { numRuns: 200 },
    );
  });
  it(
    'reports sensitivity, specificity, PPV, NPV, likelihood ratios and cost at a threshold (hand-counted ' + 'example)',
    () => {
      // 10 cases: risks ≥ 0.5 flag 3 of 4 events and 2 of 6 non-events
      const y = new Float64Array([1, 1, 1, 1, 0, 0, 0, 0, 0, 0]);
      const p = new Float64Array([0.9, 0.7, 0.5, 0.2, 0.6, 0.5, 0.3, 0.2, 0.1, 0.1]);
      const m = atThreshold(prepareThresholds(y, p), 0.5, { costs: { missedCase: 10, falseAlarm: 1 } });
      expect([m.tp, m.fp, m.fn, m.tn]).toEqual([3, 2, 1, 4]);
      expect(m.sensitivity.estimate).toBe(0.75);
      expect(m.specificity.estimate).toBeCloseTo(4 / 6, 15);
      expect(m.ppv.estimate).toBe(0.6);
      expect(m.npv.estimate).toBe(0.8);
      expect(m.lrPositive).toBeCloseTo(0.75 / (2 / 6), 14);
      expect(m.lrNegative).toBeCloseTo(0.25 / (4 / 6), 14);
      expect(m.fractionFlagged.estimate).toBe(0.5);
      expect(m.expectedCostPer100).toBeCloseTo((100 * (10 * 1 + 1 * 2)) / 10, 12);
      expect(m.sensitivity.method).toBe('wilson');
      expect(atThreshold(prepareThresholds(y, p), 0.5, { ciMethod: 'clopper-pearson' }).sensitivity.method).toBe(
        'clopper-pearson',
      );
      expect(m.flagRule).toMatch(/greater than or equal/);
    },
  );
  it('leaves LR+ undefined (null) when nothing is flagged among non-events and sensitivity is 0', () => {
    const m = atThreshold(prepareThresholds(new Float64Array([1, 0]), new Float64Array([0.2, 0.1])), 0.5);
    expect(m.lrPositive).toBeNull();
    expect(m.ppv.estimate).toBeNull();
  });
  it('puts the decision-theory threshold at C_FP/(C_FP + C_FN + B) (arithmetic of the formula)', () => {
    expect(decisionTheoryThreshold({ missedCase: 9, falseAlarm: 1 })).toBeCloseTo(0.1, 15);
    expect(decisionTheoryThreshold({ missedCase: 3, falseAlarm: 1, truePositiveBenefit: 1 })).toBeCloseTo(0.2, 15);
    const r = costThresholds(prepareThresholds(new Float64Array([0, 1]), new Float64Array([0.2, 0.8])), {
      missedCase: 9,
      falseAlarm: 1,
    });
    expect(r.decisionTheory.assumptions.join(' ')).toMatch(/calibrated/);
    expect(r.empirical.assumptions.join(' ')).toMatch(/optimistic/);
    expect(() => decisionTheoryThreshold({ missedCase: -1, falseAlarm: 1 })).toThrow(/missedCase/);
  });
  it('gives an expected-cost curve that agrees with atThreshold at every grid point', () => {
    const y = new Float64Array([1, 0, 1, 0, 0, 1, 0, 0]);
    const p = new Float64Array([0.9, 0.4, 0.35, 0.3, 0.05, 0.6, 0.62, 0.2]);
    const prep = prepareThresholds(y, p);
    const costs = { missedCase: 5, falseAlarm: 1 };
    const c = expectedCostCurve(prep, costs);
    expect(c.thresholds.length).toBe(99);
    c.thresholds.forEach((t, i) =>
      expect(c.costPer100[i]).toBeCloseTo(atThreshold(prep, t, { costs }).expectedCostPer100!, 12),
    );
  });
  it('thins a ROC curve of 100 000 distinct scores to at most 500 points, keeping both ends and the AUC', () => {
    const n = 100_000;
    const y = new Float64Array(n);
    const s = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      y[i] = i % 3 === 0 ? 1 : 0;
      s[i] = Math.sin(i) + y[i];
    }
    const full = rocCurve(y, s);
    const thin = rocCurve(y, s, { maxPoints: 500 });
    expect(thin.fpr.length).toBeLessThanOrEqual(500);
    expect(thin.fpr.length).toBeGreaterThan(400);
    expect([thin.fpr[0], thin.tpr[0]]).toEqual([0, 0]);
    expect([thin.fpr.at(-1), thin.tpr.at(-1)]).toEqual([1, 1]);
    expect(thin.auc).toBe(full.auc);
    expect(full.nPointsFull).toBe(n + 1);
  });
});

describe('likelihood-ratio confidence intervals (log method)', () => {
  // epiR 2.0.57 epi.tests (R 4.2.2), fixture reference/eval-lr.json from tests/fixtures/reference/eval-lr.R.
  const ref = readJson<{
    cases: { tp: number; fp: number; fn: number; tn: number; level: number; lrPos: number[]; lrNeg: number[] }[];
  }>('reference/eval-lr.json');
  const close = (a: number, b: number) => expect(Math.abs(a - b) / b).toBeLessThan(1e-12);

  it.each(ref.cases.map((c) => [c.tp, c.fp, c.fn, c.tn, c.level, c] as const))(
    'tp %i, fp %i, fn %i, tn %i at %f: LR± and CIs equal epiR::epi.tests to 1e-12',
    (tp, fp, fn, tn, level, c) => {
      const pos = likelihoodRatioCi(tp, tp + fn, fp, fp + tn, level)!,
        neg = likelihoodRatioCi(fn, tp + fn, tn, fp + tn, level)!;
      close(pos.lower, c.lrPos[1]);
      close(pos.upper, c.lrPos[2]);
      close(neg.lower, c.lrNeg[1]);
      close(neg.upper, c.lrNeg[2]);
      // The same through atThreshold on rows built to give this table at a cut-off of 0.5.
      const y: number[] = [],
        p: number[] = [];
      const add = (k: number, yi: number, pi: number) => {
        for (let i = 0; i < k; i++) {
          y.push(yi);
          p.push(pi);
        }
      };
      add(tp, 1, 0.9);
      add(fn, 1, 0.1);
      add(fp, 0, 0.8);
      add(tn, 0, 0.2);
      const m = atThreshold(prepareThresholds(Float64Array.from(y), Float64Array.from(p)), 0.5, { level });
      close(m.lrPositive!, c.lrPos[0]);
      close(m.lrNegative!, c.lrNeg[0]);
      close(m.lrPositiveCi!.lower, c.lrPos[1]);
      close(m.lrPositiveCi!.upper, c.lrPos[2]);
      close(m.lrNegativeCi!.lower, c.lrNeg[1]);
      close(m.lrNegativeCi!.upper, c.lrNeg[2]);
    },
  );

  it('gives no interval when a count in the formula is 0, or for weighted counts', () => {
    expect(likelihoodRatioCi(0, 10, 3, 20)).toBeNull();
    expect(likelihoodRatioCi(4, 10, 0, 20)).toBeNull();
    const y = Float64Array.from([1, 1, 0, 0, 1, 0]),
      p = Float64Array.from([0.9, 0.2, 0.8, 0.1, 0.7, 0.3]);
    expect(atThreshold(prepareThresholds(y, p, Float64Array.from([1, 2, 1, 1, 1, 1])), 0.5).lrPositiveCi).toBeNull();
    expect(atThreshold(prepareThresholds(y, p), 0.5).lrPositiveCi).not.toBeNull();
  });
});
