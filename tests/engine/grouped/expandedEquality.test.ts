import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Column, Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { runAnalysis } from '../../../src/engine/workflow/analyse';
import { bootstrapValidation, caseDraw } from '../../../src/engine/validation/bootstrap';
import { createRng } from '../../../src/engine/numerics/rng';
import { caseRows } from '../../../src/engine/design/grouped';

/** A grouped table: ward (3 levels), a numeric dose, events and trials per row. */
interface Table {
  ward: string[];
  dose: number[];
  events: number[];
  trials: number[];
}

function tableData(t: Table, weights?: number[]): Dataset {
  const levels = ['A', 'B', 'C'];
  const cols: Column[] = [
    { kind: 'categorical', name: 'ward', levels, codes: Int32Array.from(t.ward, (w) => levels.indexOf(w)) },
    { kind: 'numeric', name: 'dose', values: Float64Array.from(t.dose) },
    { kind: 'numeric', name: 'infections', values: Float64Array.from(t.events) },
    { kind: 'numeric', name: 'operations', values: Float64Array.from(t.trials) },
  ];
  if (weights) cols.push({ kind: 'numeric', name: 'copies', values: Float64Array.from(weights) });
  return { nRows: t.ward.length, columns: cols };
}

/** The same table written out one row per case (outcome yes/no), rows repeated `weights` times. */
function expanded(t: Table, weights?: number[]): Dataset {
  const ward: number[] = [];
  const dose: number[] = [];
  const y: number[] = [];
  t.ward.forEach((w, i) => {
    for (let c = 0; c < (weights?.[i] ?? 1); c++)
      for (let k = 0; k < t.trials[i]; k++) {
        ward.push(['A', 'B', 'C'].indexOf(w));
        dose.push(t.dose[i]);
        y.push(k < t.events[i] ? 1 : 0);
      }
  });
  return {
    nRows: y.length,
    columns: [
      { kind: 'categorical', name: 'ward', levels: ['A', 'B', 'C'], codes: Int32Array.from(ward) },
      { kind: 'numeric', name: 'dose', values: Float64Array.from(dose) },
      { kind: 'numeric', name: 'infection', values: Float64Array.from(y) },
    ],
  };
}

const terms: ModelSpec['terms'] = [
  { type: 'main', column: 'ward', reference: 'A' },
  { type: 'main', column: 'dose' },
];

const tables = fc
  .array(
    fc.record({
      ward: fc.constantFrom('A', 'B', 'C'),
      dose: fc.integer({ min: 0, max: 8 }),
      trials: fc.integer({ min: 0, max: 30 }),
      share: fc.double({ min: 0.05, max: 0.6, noNaN: true }),
    }),
    { minLength: 12, maxLength: 30 },
  )
  .map((rows) => ({
    ward: rows.map((r) => r.ward),
    dose: rows.map((r) => r.dose),
    trials: rows.map((r) => r.trials),
    events: rows.map((r) => Math.round(r.trials * r.share)),
  }))
  // a fit needs every ward, events and non-events, and no ward whose cases are all one outcome (separation)
  .filter((t) =>
    ['A', 'B', 'C'].every((w) => {
      let e = 0,
        n = 0;
      t.ward.forEach((x, i) => {
        if (x === w) {
          e += t.events[i];
          n += t.trials[i];
        }
      });
      return e > 0 && e < n;
    }),
  );

const close = (a: number | null | undefined, b: number | null | undefined, tol: number) => {
  expect(a === null || a === undefined).toBe(b === null || b === undefined);
  if (a !== null && a !== undefined && b !== null && b !== undefined)
    expect(Math.abs(a - b)).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(b)));
};

// Property (common practice: a table of counts is the same data as its cases written out): every per-case statistic
// of the grouped fit equals that of the expanded one-row-per-case data.
describe('a grouped table gives the record of its cases written out one row per case', () => {
  it('estimates, SEs, profile limits, LR tests, AUC, DeLong CI, Brier, calibration, net benefit', async () => {
    await fc.assert(
      fc.asyncProperty(
        tables,
        fc.array(fc.integer({ min: 1, max: 3 }), { minLength: 30, maxLength: 30 }),
        async (t, wAll) => {
          const weights = wAll.slice(0, t.ward.length);
          const grouped = await runAnalysis(tableData(t, weights), {
            spec: {
              outcome: 'infections',
              layout: { kind: 'events-trials', trials: 'operations' },
              weights: 'copies',
              terms,
            },
            threshold: 0.2,
          });
          const one = await runAnalysis(expanded(t, weights), {
            spec: { outcome: 'infection', terms },
            threshold: 0.2,
          });
          const g = grouped.record,
            o = one.record;
          expect(g.fit.nUsed).toBe(o.fit.nUsed);
          expect(g.fit.events).toBe(o.fit.events);
          g.fit.coefficients.forEach((c, j) => {
            const d = o.fit.coefficients[j];
            close(c.estimate, d.estimate, 1e-7);
            close(c.se, d.se, 1e-6);
            close(c.profileLower, d.profileLower, 1e-6);
            close(c.profileUpper, d.profileUpper, 1e-6);
          });
          g.fit.terms.forEach((tr, j) => close(tr.lrChi2, o.fit.terms[j].lrChi2, 1e-6));
          close(g.fit.deviance, o.fit.deviance, 1e-8);
          close(g.fit.nullDeviance, o.fit.nullDeviance, 1e-10);
          close(g.fit.aic, o.fit.aic, 1e-8);
          close(g.fit.bic, o.fit.bic, 1e-8);
          const ge = g.evaluation,
            oe = o.evaluation;
          close(ge.auc.auc, oe.auc.auc, 1e-12);
          close(ge.auc.lower, oe.auc.lower, 1e-9);
          close(ge.auc.upper, oe.auc.upper, 1e-9);
          close(ge.brier.brier, oe.brier.brier, 1e-12);
          close(ge.calibration.slope?.estimate, oe.calibration.slope?.estimate, 1e-6);
          close(ge.calibration.interceptInTheLarge?.estimate, oe.calibration.interceptInTheLarge?.estimate, 1e-6);
          close(ge.hosmerLemeshow?.statistic, oe.hosmerLemeshow?.statistic, 1e-8);
          ge.decisionCurve.model.forEach((v, k) => close(v, oe.decisionCurve.model[k], 1e-12));
          for (const k of ['tp', 'fp', 'fn', 'tn'] as const) expect(ge.atThreshold![k]).toBe(oe.atThreshold![k]);
          close(ge.atThreshold!.sensitivity.lower, oe.atThreshold!.sensitivity.lower, 1e-12);
          expect(g.layout!.events).toBe(o.fit.events);
        },
      ),
      { numRuns: 12, seed: 19 },
    );
  });
});

describe('bad counts are refused, naming the row and the column', () => {
  const t: Table = { ward: ['A', 'B', 'C'], dose: [1, 2, 3], events: [2, 5, 1], trials: [10, 4, 8] };
  const spec = (layout: ModelSpec['layout'], weights?: string): ModelSpec => ({
    outcome: 'infections',
    layout,
    terms,
    ...(weights ? { weights } : {}),
  });
  const trials = { kind: 'events-trials', trials: 'operations' } as const;

  it('events above trials', () => {
    expect(() => caseRows(tableData(t), spec(trials))).toThrow(
      /Row 3: 5 events in "infections" but only 4 trials in "operations"/,
    );
  });
  it('a negative count', () => {
    const bad = { ...t, events: [2, -1, 1] };
    expect(() => caseRows(tableData(bad), spec(trials))).toThrow(
      /Row 3: "infections" is -1; a count of events must be a whole number/,
    );
  });
  it('a fractional count', () => {
    const bad = { ...t, trials: [10, 4.5, 8], events: [2, 1, 1] };
    expect(() => caseRows(tableData(bad), spec(trials))).toThrow(
      /Row 3: "operations" is 4.5; a count of trials must be a whole number/,
    );
  });
  it('a weight that is not a whole number ≥ 1', () => {
    const fixed = { ...t, events: [2, 1, 1] };
    expect(() => caseRows(tableData(fixed, [1, 0, 2]), spec(trials, 'copies'))).toThrow(
      /Row 3: "copies" is 0; a frequency weight/,
    );
    expect(() => caseRows(tableData(fixed, [1, 1.5, 2]), spec(trials, 'copies'))).toThrow(/Row 3: "copies" is 1.5/);
  });
  it('a count column also used as a predictor', () => {
    const fixed = { ...t, events: [2, 1, 1] };
    expect(() =>
      caseRows(tableData(fixed), { ...spec(trials), terms: [...terms, { type: 'main', column: 'operations' }] }),
    ).toThrow(/"operations" is part of the outcome layout/);
  });
  it('rows with no cases are left out and named; missing counts are counted per column', () => {
    const withEmpty = { ...t, events: [2, 0, NaN], trials: [10, 0, 8] };
    const c = caseRows(tableData(withEmpty), spec(trials));
    expect(c.layout.tableRowsUsed).toBe(1);
    expect(c.warnings.map((w) => w.message).join(' ')).toMatch(/row 3\b.*no cases|no cases.*row 3\b/);
    expect(c.warnings.map((w) => w.message).join(' ')).toMatch(/"infections" 1/);
  });
});

describe('the bootstrap resamples cases, not rows of the table', () => {
  it('draws Σ cases per replicate, each row in proportion to the cases it stands for', () => {
    // rows standing for 10, 100 and 1000 cases: a row resample gives each a third of the draws, a case resample
    // 10/1110, 100/1110 and 1000/1110 (binomial expectation; common practice)
    const draw = caseDraw(Float64Array.from([10, 100, 1000]));
    const counts = new Float64Array(3);
    const rng = createRng(5);
    const total = new Float64Array(3);
    for (let b = 0; b < 200; b++) {
      counts.fill(0);
      draw(counts, rng);
      expect(counts[0] + counts[1] + counts[2]).toBe(1110);
      for (let i = 0; i < 3; i++) total[i] += counts[i];
    }
    // 200 replicates: SD of the mean count of row 1 is √(1110·p(1−p)/200) ≈ 0.21, of row 2 ≈ 0.67
    expect(Math.abs(total[0] / 200 - 10)).toBeLessThan(1);
    expect(Math.abs(total[1] / 200 - 100)).toBeLessThan(3);
  });

  it('a seeded bootstrap of a grouped table runs every replicate', async () => {
    const t: Table = {
      ward: ['A', 'B', 'C', 'A', 'B', 'C'],
      dose: [1, 2, 3, 4, 5, 6],
      events: [3, 20, 300, 4, 30, 200],
      trials: [10, 100, 1000, 12, 90, 900],
    };
    const rows = caseRows(tableData(t), {
      outcome: 'infections',
      layout: { kind: 'events-trials', trials: 'operations' },
      terms,
    });
    const v = await bootstrapValidation(
      { data: rows.data, spec: rows.spec, fitOptions: { method: 'ml' }, penalty: null, seed: 1 },
      { B: 20, seed: 3 },
    );
    expect(v.failed).toBe(0);
    expect(v.rows.find((r) => r.metric === 'auc')!.apparent).toBeGreaterThan(0.5);
  });
});
