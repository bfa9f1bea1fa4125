import { describe, expect, it } from 'vitest';
import { buildPointsScore, casePoints, pointsOfRows } from '../../../src/engine/points';
import { handData, handModel, handOptions } from './handModel';

// Source: a worked example rebuilt by hand. It follows the steps of Sullivan, Massaro & D'Agostino (2004, Stat Med
// 23:1631) — categories with reference values, a base category per predictor, D = β(W − W_REF), a constant B,
// points = round(D / B), risk = 1/(1 + exp(−(β₀ + Σ β W_REF + B·total))) — but the model, ranges and reference
// values are invented for this test (handModel.ts), not taken from the paper, whose numbers we do not have here.
// Every number below was worked out by hand; the risks with a calculator's exp().
//
// B = the effect of 5 years of age = 0.05 × 5 = 0.25 (as the paper's example, 1 point = 5 years of age).
// age  (β 0.05):  ranges <40, 40–<50, 50–<60, ≥60; W = 35, 45, 55, 65; base <40 (lowest risk)
//                 D = 0.05·(W − 35) = 0, 0.5, 1.0, 1.5          → D/B = 0, 2, 4, 6        → points 0, 2, 4, 6
// chol (β 0.005): ranges <200, 200–<240, ≥240; W = 180, 220, 260; base <200
//                 D = 0.005·(W − 180) = 0, 0.2, 0.4             → D/B = 0, 0.8, 1.6      → points 0, 1, 2
// hdl  (β −0.03): ranges <40, 40–<60, ≥60; W = 35, 50, 70; base ≥60 (the lowest risk: the largest HDL)
//                 D = −0.03·(W − 70) = 1.05, 0.6, 0             → D/B = 4.2, 2.4, 0      → points 4, 2, 0
// sbp  (β 0.01):  ranges <120, 120–<140, 140–<160, ≥160; W = 110, 130, 150, 170; base <120
//                 D = 0.01·(W − 110) = 0, 0.2, 0.4, 0.6         → D/B = 0, 0.8, 1.6, 2.4 → points 0, 1, 2, 2
// smoker: no 0, yes 0.6 → 2.4 → 2 points;  diabetes: no 0, yes 0.5 → 2 → 2 points.
// Base linear predictor: −8 + 0.05·35 + 0.005·180 − 0.03·70 + 0.01·110 = −8 + 1.75 + 0.9 − 2.1 + 1.1 = −6.35.
// Totals: 0 … 6 + 2 + 4 + 2 + 2 + 2 = 18, every one attainable (cholesterol's 1 point gives the odd ones).
// Risk(T) = 1/(1 + exp(6.35 − 0.25·T)): T = 0: 1/(1 + 572.493) = 0.00174370; T = 1: 1/446.858 = 0.00223785;
// T = 10: 1/47.9931 = 0.0208363; T = 11: 1/37.5982 = 0.0265970; T = 18: 1/7.35982 = 0.135873.
const score = buildPointsScore(handModel, handData, handOptions);
const term = (name: string) => score.terms.find((t) => t.term === name)!;
const points = (name: string) => term(name).categories.map((c) => c.points);

describe('the points method on a hand-worked example (procedure of Sullivan et al. 2004; invented numbers)', () => {
  it('takes B = 0.25, the effect of 5 years of age, and says so', () => {
    expect(score.baseUnit.logOdds).toBeCloseTo(0.25, 15);
    expect(score.baseUnit.rule).toBe('per-increase');
    expect(score.baseUnit.description).toContain('5');
    expect(score.baseUnit.description).toContain('"age"');
  });

  it('gives each category the hand-computed points', () => {
    expect(points('age')).toEqual([0, 2, 4, 6]);
    expect(points('chol')).toEqual([0, 1, 2]);
    expect(points('hdl')).toEqual([4, 2, 0]);
    expect(points('sbp')).toEqual([0, 1, 2, 2]);
    expect(points('smoker')).toEqual([0, 2]);
    expect(points('diabetes')).toEqual([0, 2]);
    expect(term('hdl').categories.map((c) => c.exactPoints)).toEqual([4.2, 2.4, 0].map((v) => expect.closeTo(v, 12)));
    expect(term('sbp').categories.map((c) => c.exactPoints)).toEqual(
      [0, 0.8, 1.6, 2.4].map((v) => expect.closeTo(v, 12)),
    );
  });

  it("takes the lowest-risk category as each predictor's base (HDL: the highest range)", () => {
    expect(term('age').base).toBe(0);
    expect(term('hdl').base).toBe(2);
    expect(term('hdl').categories[2].label).toBe('60 or more');
    expect(term('age').categories.map((c) => c.label)).toEqual([
      'under 40',
      '40 to under 50',
      '50 to under 60',
      '60 or more',
    ]);
  });

  it('has base linear predictor −6.35 and the hand-computed risks for totals 0, 1, 10, 11 and 18', () => {
    expect(score.baseLinearPredictor).toBeCloseTo(-6.35, 12);
    expect(score.minTotal).toBe(0);
    expect(score.maxTotal).toBe(18);
    expect(score.table.map((r) => r.total)).toEqual(Array.from({ length: 19 }, (_, k) => k));
    const risk = (t: number) => score.table.find((r) => r.total === t)!.risk;
    expect(risk(0)).toBeCloseTo(0.0017437, 7);
    expect(risk(1)).toBeCloseTo(0.00223785, 8);
    expect(risk(10)).toBeCloseTo(0.0208363, 7);
    expect(risk(11)).toBeCloseTo(0.026597, 6);
    expect(risk(18)).toBeCloseTo(0.135873, 6);
  });

  it('scores a 52-year-old smoker, cholesterol 230, HDL 45, SBP 145, no diabetes: 4+1+2+2+2+0 = 11 points', () => {
    // The full model for this person: −8 + 2.6 + 1.15 − 1.35 + 1.45 + 0.6 = −3.55 → 0.0279226; the card gives
    // the risk of 11 points, 0.0265970 (its reference values stand in for the person's own).
    const c = casePoints(score, { age: 52, chol: 230, hdl: '45', sbp: 145, smoker: 'yes', diabetes: 'no' });
    expect(c.terms.map((t) => t.points)).toEqual([4, 1, 2, 2, 2, 0]);
    expect(c.terms.map((t) => t.label)).toEqual([
      '50 to under 60',
      '200 to under 240',
      '40 to under 60',
      '140 to under 160',
      'yes',
      'no',
    ]);
    expect(c.total).toBe(11);
    expect(c.risk).toBeCloseTo(0.026597, 6);
    expect(c.missing).toEqual([]);
  });

  it('puts a value on a cut point into the range above it, and reports a missing value', () => {
    expect(casePoints(score, { age: 40, chol: 200, hdl: 60, sbp: 160, smoker: 'no', diabetes: 'no' }).total).toBe(
      2 + 1 + 0 + 2,
    );
    const c = casePoints(score, { age: 40, chol: 200, hdl: 60, sbp: null, smoker: 'no', diabetes: 'no' });
    expect(c.total).toBeNull();
    expect(c.missing).toEqual(['sbp']);
  });

  it('scores dataset rows: 11 and 0 + 0 + 0 + 0 = 0 points; the row without a blood pressure is left out', () => {
    // row 3: age 38 → 0, chol 190 → 0, HDL 65 → 0, SBP 118 → 0, non-smoker, no diabetes → 0 points.
    const r = pointsOfRows(score, handData);
    expect(Array.from(r.rowsUsed)).toEqual([0, 1]);
    expect(Array.from(r.totals)).toEqual([11, 0]);
    expect(r.risks[0]).toBe(score.table[11].risk);
    expect(r.nDropped).toBe(1);
    expect(r.droppedByColumn).toEqual({ sbp: 1 });
  });

  it('says how many units of each linear predictor one point is worth (B/|β|)', () => {
    expect(score.unitsPerPoint.map((u) => [u.column, u.units])).toEqual([
      ['age', expect.closeTo(5, 12)],
      ['chol', expect.closeTo(50, 12)],
      ['hdl', expect.closeTo(25 / 3, 12)],
      ['sbp', expect.closeTo(25, 12)],
    ]);
  });
});
