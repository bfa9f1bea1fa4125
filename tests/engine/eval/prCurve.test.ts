import { describe, expect, it } from 'vitest';
import { prCurve } from '../../../src/engine/evaluation/prCurve';
import { readJson, readNumericCsv } from './readCsv';

// Reference: Python scikit-learn 1.2.1 sklearn.metrics.average_precision_score and precision_recall_curve
// (script: tests/fixtures/reference/eval-average-precision.py).
const ref = readJson('reference/eval-average-precision.json');
const asah = readNumericCsv('data/eval-aSAH.csv');
const pima = readNumericCsv('data/eval-pima-te-predictions.csv');
const inputs: Record<string, [Float64Array, Float64Array, Float64Array | undefined]> = {
  'aSAH s100b': [asah.outcome, asah.s100b, undefined],
  'aSAH wfns': [asah.outcome, asah.wfns, undefined],
  'Pima.te p': [pima.y, pima.p, undefined],
  'Pima.te p weighted': [pima.y, pima.p, pima.w],
};

describe('precision–recall curve', () => {
  for (const c of ref.cases) {
    it(`matches scikit-learn's average precision and curve points for ${c.name} to 1e-12`, () => {
      const [y, s, w] = inputs[c.name];
      const res = prCurve(y, s, { weights: w });
      expect(Math.abs(res.averagePrecision! - c.averagePrecision)).toBeLessThan(1e-12);
      // scikit-learn stops its curve once recall reaches 1; compare that part (our first point is recall 0,
      // precision 1)
      const k = c.recall.length;
      expect(res.threshold.slice(1, k + 1)).toEqual(c.threshold);
      expect(Math.max(...c.recall.map((v: number, i: number) => Math.abs(v - res.recall[i + 1])))).toBeLessThan(1e-12);
      expect(Math.max(...c.precision.map((v: number, i: number) => Math.abs(v - res.precision[i + 1])))).toBeLessThan(
        1e-12,
      );
    });
  }
  it('thins to at most the requested number of points and keeps both ends', () => {
    const res = prCurve(pima.y, pima.p, { maxPoints: 50 });
    expect(res.recall.length).toBeLessThanOrEqual(51);
    expect(res.recall[0]).toBe(0);
    expect(res.recall[res.recall.length - 1]).toBe(1);
    expect(res.averagePrecision).toBeCloseTo(ref.cases[2].averagePrecision, 12);
  });
  it('returns no curve and a warning when there are no events', () => {
    const res = prCurve(new Float64Array([0, 0]), new Float64Array([0.1, 0.2]));
    expect(res.averagePrecision).toBeNull();
    expect(res.warnings.map((w) => w.code)).toEqual(['no-events']);
  });
});
