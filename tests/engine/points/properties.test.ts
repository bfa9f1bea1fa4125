import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { DesignRecipe } from '../../../src/engine/core/model';
import { buildPointsScore, casePoints, type PointsModel } from '../../../src/engine/points';

// Source: the definitions of the method (Sullivan, Massaro & D'Agostino 2004, Stat Med 23:1631): a total T has the
// risk 1/(1 + exp(−(β₀ + Σ fᵢ(W_iREF) + B·T))), and each term's points differ from D/B by at most ½, so the score's
// linear predictor is within (number of terms)·B/2 of the model's at the reference values, and its risk within
// (number of terms)·B/8 (the logistic function's slope is at most ¼). Checked on random models, against a
// brute-force enumeration of every combination of categories.

const empty = { nRows: 0, columns: [] };
const sigmoid = (e: number) => 1 / (1 + Math.exp(-e));

/** A random main-effects model of categorical terms: per term, the coefficients of levels 2… (level 1 is 0). */
const modelArb = fc.record({
  intercept: fc.double({ min: -4, max: 1, noNaN: true }),
  terms: fc.array(fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 1, maxLength: 4 }), {
    minLength: 1,
    maxLength: 3,
  }),
});

function categoricalModel(m: { intercept: number; terms: number[][] }): PointsModel {
  const terms: DesignRecipe['terms'] = m.terms.map((bs, i) => ({
    type: 'categorical',
    name: `x${i}`,
    column: `x${i}`,
    levels: ['L0', ...bs.map((_, k) => `L${k + 1}`)],
    reference: 'L0',
  }));
  const coefficients = [
    { name: '(Intercept)', estimate: m.intercept },
    ...m.terms.flatMap((bs, i) => bs.map((b, k) => ({ name: `x${i}=L${k + 1}`, estimate: b }))),
  ];
  return {
    recipe: { outcome: 'y', event: '1', terms, columnNames: coefficients.map((c) => c.name) },
    coefficients,
  };
}

/** Every combination of one level per term: the level indices and the model's exact linear predictor. */
function combinations(m: { intercept: number; terms: number[][] }): { levels: number[]; eta: number }[] {
  let out = [{ levels: [] as number[], eta: m.intercept }];
  for (const bs of m.terms) {
    const effects = [0, ...bs];
    out = out.flatMap((c) => effects.map((b, k) => ({ levels: [...c.levels, k], eta: c.eta + b })));
  }
  return out;
}

const valuesOf = (levels: number[]) => Object.fromEntries(levels.map((k, i) => [`x${i}`, `L${k}`]));

describe('points table (property)', () => {
  it('holds 1/(1 + exp(−(base LP + B·T))) for exactly the totals some combination of categories attains', () => {
    fc.assert(
      fc.property(modelArb, fc.double({ min: 0.05, max: 1, noNaN: true }), fc.boolean(), (m, B, first) => {
        const model = categoricalModel(m);
        const s = buildPointsScore(model, empty, {
          baseUnit: { kind: 'log-odds', value: B },
          base: first ? 'first' : 'lowest-risk',
        });
        const base = m.intercept + s.terms.reduce((a, t) => a + t.categories[t.base].contribution, 0);
        expect(s.baseLinearPredictor).toBeCloseTo(base, 12);
        const reached = new Set(
          combinations(m).map(({ levels }) => levels.reduce((a, k, i) => a + s.terms[i].categories[k].points, 0)),
        );
        expect(s.table.map((r) => r.total)).toEqual([...reached].sort((a, b) => a - b));
        for (const r of s.table) {
          expect(r.linearPredictor).toBe(s.baseLinearPredictor + B * r.total);
          expect(Math.abs(r.risk - sigmoid(r.linearPredictor))).toBeLessThan(1e-15);
        }
        if (!first) for (const t of s.terms) for (const c of t.categories) expect(c.points).toBeGreaterThanOrEqual(0);
      }),
      { numRuns: 200 },
    );
  });

  it('rounds each D/B to the nearest whole number (error at most ½ point)', () => {
    fc.assert(
      fc.property(modelArb, fc.double({ min: 0.01, max: 2, noNaN: true }), (m, B) => {
        const s = buildPointsScore(categoricalModel(m), empty, { baseUnit: { kind: 'log-odds', value: B } });
        for (const t of s.terms)
          for (const c of t.categories) expect(Math.abs(c.points - c.difference / B)).toBeLessThanOrEqual(0.5 + 1e-9);
      }),
      { numRuns: 200 },
    );
  });
});

describe('a small base unit (property)', () => {
  it("brings every case's points risk within (terms)·B/8 of the model's, so B → 0 recovers the model", () => {
    fc.assert(
      fc.property(modelArb, (m) => {
        const model = categoricalModel(m);
        const k = m.terms.length;
        let previous = Infinity;
        for (const B of [0.2, 0.02, 0.002]) {
          const s = buildPointsScore(model, empty, { baseUnit: { kind: 'log-odds', value: B } });
          let worst = 0;
          for (const c of combinations(m))
            worst = Math.max(worst, Math.abs(casePoints(s, valuesOf(c.levels)).risk! - sigmoid(c.eta)));
          expect(worst).toBeLessThanOrEqual((k * B) / 8 + 1e-12);
          expect(worst).toBeLessThanOrEqual(previous + 1e-12);
          previous = worst;
        }
        expect(previous).toBeLessThan(1e-3);
      }),
      { numRuns: 100 },
    );
  });

  it("brings a numeric term's points within B/2 of the model's linear predictor at its reference values", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -0.2, max: 0.2, noNaN: true }).filter((b) => Math.abs(b) > 1e-3),
        fc.double({ min: 0.001, max: 0.5, noNaN: true }),
        (beta, B) => {
          const model: PointsModel = {
            recipe: {
              outcome: 'y',
              event: '1',
              terms: [{ type: 'numeric', name: 'x', column: 'x' }],
              columnNames: ['(Intercept)', 'x'],
            },
            coefficients: [
              { name: '(Intercept)', estimate: -1 },
              { name: 'x', estimate: beta },
            ],
          };
          const refs = [5, 15, 25, 35, 45];
          const s = buildPointsScore(model, empty, {
            baseUnit: { kind: 'log-odds', value: B },
            cuts: { x: [10, 20, 30, 40] },
            referenceValues: { x: refs },
          });
          refs.forEach((w) => {
            const c = casePoints(s, { x: w });
            const lp = s.baseLinearPredictor + B * c.total!;
            expect(Math.abs(lp - (-1 + beta * w))).toBeLessThanOrEqual(B / 2 + 1e-9);
          });
        },
      ),
      { numRuns: 200 },
    );
  });
});
