import { describe, expect, it } from 'vitest';
import { delongAuc, delongPairedTest } from '../../../src/engine/evaluation/delong';
import { rocCurve } from '../../../src/engine/evaluation/roc';
import { readJson, readNumericCsv } from './readCsv';

// Reference: R 4.2.2, pROC 1.18.0 roc(direction = "<"), ci.auc(method = "delong"), var(method = "delong"),
// roc.test(method = "delong", paired = TRUE) on pROC's shipped aSAH data (tests/fixtures/reference/eval-delong.R).
const ref = readJson('reference/eval-delong.json');
const d = readNumericCsv('data/eval-aSAH.csv');

describe('DeLong AUC against pROC on aSAH', () => {
  for (const r of ref.single) {
    it(`matches pROC's AUC, DeLong SE and 95% CI for ${r.marker} to 1e-12`, () => {
      const res = delongAuc(d.outcome, d[r.marker]);
      expect(res.ciMethod).toBe('delong-auc-scale');
      expect(Math.abs(res.auc! - r.auc)).toBeLessThan(1e-12);
      expect(Math.abs(res.se! - r.se)).toBeLessThan(1e-12);
      expect(Math.abs(res.lower! - r.lower)).toBeLessThan(1e-12);
      expect(Math.abs(res.upper! - r.upper)).toBeLessThan(1e-12);
      expect(res.warnings).toEqual([]);
    });
    it(`gives the same AUC from the ROC trapezoid (Mann–Whitney with ties) for ${r.marker}`, () => {
      expect(Math.abs(rocCurve(d.outcome, d[r.marker]).auc! - r.auc)).toBeLessThan(1e-12);
    });
  }
  for (const r of ref.paired) {
    it(`matches pROC's paired DeLong test ${r.marker1} vs ${r.marker2} (z, p, CI of the difference) to 1e-10`, () => {
      const t = delongPairedTest(d.outcome, d[r.marker1], d[r.marker2]);
      expect(Math.abs(t.auc1! - r.auc1)).toBeLessThan(1e-12);
      expect(Math.abs(t.auc2! - r.auc2)).toBeLessThan(1e-12);
      expect(Math.abs(t.z! - r.z)).toBeLessThan(1e-10);
      expect(Math.abs(t.p! - r.p)).toBeLessThan(1e-10);
      expect(Math.abs(t.lower! - r.lower)).toBeLessThan(1e-10);
      expect(Math.abs(t.upper! - r.upper)).toBeLessThan(1e-10);
    });
  }
  for (const c of ref.curves) {
    it(
      `gives pROC's ROC points (1 − specificity, sensitivity) at every distinct threshold for ${c.marker} to ` +
        `1e-14`,
      () => {
        const roc = rocCurve(d.outcome, d[c.marker]);
        expect(roc.fpr.length).toBe(c.fpr.length);
        expect(Math.max(...roc.fpr.map((v, i) => Math.abs(v - c.fpr[i])))).toBeLessThan(1e-14);
        expect(Math.max(...roc.tpr.map((v, i) => Math.abs(v - c.tpr[i])))).toBeLessThan(1e-14);
      },
    );
  }
  it('keeps a logit-scale interval inside (0, 1) and around the AUC', () => {
    const res = delongAuc(d.outcome, d.wfns, { scale: 'logit' });
    expect(res.ciMethod).toBe('delong-logit-scale');
    expect(res.lower!).toBeGreaterThan(0.7);
    expect(res.lower!).toBeLessThan(res.auc!);
    expect(res.upper!).toBeGreaterThan(res.auc!);
    expect(res.upper!).toBeLessThan(1);
  });
});

describe('DeLong edge cases', () => {
  const y = new Float64Array([0, 0, 0, 1, 1, 1, 0, 1]);
  it('warns and gives a one-sided interval, not [1, 1], when the AUC is exactly 1', () => {
    const s = new Float64Array([0.1, 0.2, 0.3, 0.7, 0.8, 0.9, 0.15, 0.95]);
    const res = delongAuc(y, s);
    expect(res.auc).toBe(1);
    expect(res.se).toBe(0);
    expect(res.ciMethod).toBe('max-variance-bound');
    expect(res.upper).toBe(1);
    const z = 1.959963984540054;
    expect(res.lower).toBeCloseTo(4 / (4 + z * z), 12);
    expect(res.warnings.map((w) => w.code)).toEqual(['auc-perfect']);
  });
  it('mirrors the bound when the AUC is exactly 0', () => {
    const s = new Float64Array([0.9, 0.8, 0.7, 0.3, 0.2, 0.1, 0.85, 0.05]);
    const res = delongAuc(y, s);
    expect(res.auc).toBe(0);
    expect(res.lower).toBe(0);
    expect(res.upper!).toBeGreaterThan(0);
  });
  it('reports an AUC of 0.5 with no interval and a warning when all scores are tied', () => {
    const res = delongAuc(y, new Float64Array(8).fill(0.3));
    expect(res.auc).toBe(0.5);
    expect(res.lower).toBeNull();
    expect(res.warnings.map((w) => w.code)).toContain('scores-all-tied');
    expect(rocCurve(y, new Float64Array(8).fill(0.3)).warnings.map((w) => w.code)).toContain('scores-all-tied');
  });
  it('gives the AUC but no SE with a single event', () => {
    const y1 = new Float64Array([0, 0, 0, 1]);
    const res = delongAuc(y1, new Float64Array([0.1, 0.5, 0.3, 0.4]));
    expect(res.auc).toBeCloseTo(2 / 3, 14);
    expect(res.se).toBeNull();
    expect(res.warnings.map((w) => w.code)).toEqual(['class-too-small']);
  });
  it('returns nulls and a warning when one class is absent', () => {
    const res = delongAuc(new Float64Array([0, 0, 0]), new Float64Array([0.1, 0.2, 0.3]));
    expect(res.auc).toBeNull();
    expect(res.warnings.map((w) => w.code)).toEqual(['one-class-only']);
  });
  it('refuses a paired test on identical scores with a warning instead of dividing by zero', () => {
    const s = new Float64Array([0.1, 0.2, 0.3, 0.7, 0.4, 0.9, 0.15, 0.35]);
    const t = delongPairedTest(y, s, s);
    expect(t.p).toBeNull();
    expect(t.warnings.map((w) => w.code)).toContain('auc-difference-zero-variance');
  });
  it('throws a FulcraError naming the row for a missing score', () => {
    expect(() => delongAuc(y, new Float64Array([0.1, NaN, 0, 0, 0, 0, 0, 0]))).toThrow(/value number 2/);
  });
  it('agrees with a brute-force pairwise Mann–Whitney count on data with many ties', () => {
    const n = 300;
    const yy = new Float64Array(n);
    const s = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      yy[i] = (i * 7919) % 5 < 2 ? 1 : 0;
      s[i] = ((i * 104729) % 13) / 13 + 0.1 * yy[i];
    }
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++)
        if (yy[i] === 1 && yy[j] === 0) {
          den++;
          num += s[i] > s[j] ? 1 : s[i] === s[j] ? 0.5 : 0;
        }
    expect(delongAuc(yy, s).auc).toBeCloseTo(num / den, 12);
    expect(rocCurve(yy, s).auc).toBeCloseTo(num / den, 12);
  });
});
