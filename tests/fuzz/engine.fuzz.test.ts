import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { evaluate } from '../../src/engine/evaluation/evaluate';
import { fit } from '../../src/engine/fitting/fit';
import type { FitMethod, FitResult } from '../../src/engine/core/model';
import { predict } from '../../src/engine/fitting/predict';
import {
  atThreshold,
  costThresholds,
  expectedCostCurve,
  prepareThresholds,
} from '../../src/engine/evaluation/threshold';
import { buildCase, engineCase, type EngineCase, type PredictorKind } from './engineData';
import { nonFinitePaths, stem } from './walk';

/** Runs `f`; a thrown FulcraError is an allowed outcome (returned), anything else is re-thrown. */
function guarded<T>(f: () => T): { value: T } | { error: FulcraError } {
  try {
    return { value: f() };
  } catch (e) {
    if (e instanceof FulcraError) return { error: e };
    throw e;
  }
}

const codes = (r: { warnings: { code: string }[] }) => new Set(r.warnings.map((w) => w.code));

/** Warnings/errors the planted problems must produce (the warnings channel names each problem). */
function checkPlanted(c: EngineCase, method: FitMethod, out: { value: FitResult } | { error: FulcraError }): void {
  const kinds = new Set(c.predictors.map((p) => p.kind));
  if (kinds.has('all-missing')) {
    expect('error' in out && out.error.code).toBe('no-complete-rows');
    return;
  }
  if ('error' in out) {
    // The only data problems allowed to stop a fit: no usable rows, a single outcome class, a categorical
    // outcome whose only level left is not the event, a spline on a column with too few distinct values, an
    // interaction whose products leave the double range, and (only where a column mixes sizes ~1e-300 and ~1e300)
    // values beyond 2^52 times the column's others (src/engine/fitting/extremeValues.ts).
    if (out.error.code === 'extreme-values') {
      expect(kinds.has('huge-range')).toBe(true);
      return;
    }
    expect([
      'no-complete-rows',
      'one-outcome-class',
      'unknown-event-level',
      'spline-knots-tied',
      'spline-no-data',
      'design-overflow',
    ]).toContain(out.error.code);
    return;
  }
  const r = out.value;
  const w = codes(r);
  if (kinds.has('constant') || kinds.has('single-level'))
    expect(
      [...w].some((k) => k === 'aliased' || k === 'constant-predictor'),
      [...w].join(','),
    ).toBe(true);
  // A copy of a varying column is aliased; a copy of a constant column is just another constant one.
  const source = (j: number): PredictorKind['kind'] => {
    const k = c.predictors[j];
    return k.kind === 'duplicate' ? (j === 0 ? 'normal' : source(k.of % j)) : k.kind;
  };
  const copiesVarying = c.predictors.some(
    (p, j) => p.kind === 'duplicate' && j > 0 && !['constant', 'single-level'].includes(source(j)),
  );
  if (copiesVarying) expect(w.has('aliased'), [...w].join(',')).toBe(true);
  if (r.nDropped > 0) expect(w.has('rows-dropped')).toBe(true);
  if (method === 'ridge') expect(w.has('penalised-no-inference')).toBe(true);
  if (method === 'ml' && kinds.has('separator')) {
    expect(
      [...w].some((k) => k === 'complete-separation' || k === 'quasi-separation' || k === 'aliased'),
      [...w].join(','),
    ).toBe(true);
  }
  if (!r.converged && method !== 'ml') expect(w.has('not-converged'), [...w].join(',')).toBe(true);
}

/** predict: lower/upper are documented NaN when the fit has no covariance. */
const predictNaN = (r: FitResult) => (path: string, v: number) =>
  Number.isNaN(v) && r.covariance === null && (stem(path) === 'lower' || stem(path) === 'upper');

const SETTINGS = { numRuns: 120, seed: 20261202, endOnFailure: true } as const;

describe('engine under hostile designs', () => {
  for (const method of ['ml', 'firth', 'ridge'] as const) {
    it(`fit/predict/evaluate/threshold (${method}) throw only FulcraError and return only finite numbers`, () => {
      fc.assert(
        fc.property(engineCase, fc.boolean(), fc.double({ min: 0, max: 1, noNaN: true }), (c, profile, t) => {
          const { data, spec, y01 } = buildCase(c);
          const out = guarded(() =>
            fit(data, spec, { method, lambda: method === 'ridge' ? 0.05 : 0, profile: profile && c.n <= 80 }),
          );
          checkPlanted(c, method, out);
          if ('error' in out) return;
          const r = out.value;
          expect(nonFinitePaths(r), 'fit result').toEqual([]);

          const pr = guarded(() => predict(r, data));
          if ('error' in pr) throw pr.error; // the data the model was fitted on must score
          expect(nonFinitePaths(pr.value, predictNaN(r)), 'prediction').toEqual([]);

          const rows = Array.from(pr.value.rowsUsed)
            .map((row, k) => ({ row, k }))
            .filter(({ row }) => {
              const oc = data.columns[0];
              return oc.kind === 'numeric' ? !Number.isNaN(oc.values[row]) : oc.codes[row] >= 0;
            });
          const y = Float64Array.from(rows, ({ row }) => y01[row]);
          const risk = Float64Array.from(rows, ({ k }) => pr.value.risk[k]);
          const eta = Float64Array.from(rows, ({ k }) => pr.value.eta[k]);
          const costs = { missedCase: 5, falseAlarm: 1 };
          const ev = guarded(() => evaluate(y, risk, { eta, costs }));
          if ('error' in ev) throw ev.error; // risks from a fit are valid input
          expect(nonFinitePaths(ev.value), 'evaluation').toEqual([]);

          const prep = prepareThresholds(y, risk);
          for (const th of [0, t, 1])
            expect(nonFinitePaths(atThreshold(prep, th, { costs })), `atThreshold ${th}`).toEqual([]);
          expect(nonFinitePaths(costThresholds(prep, costs)), 'costThresholds').toEqual([]);
          expect(nonFinitePaths(expectedCostCurve(prep, costs)), 'expectedCostCurve').toEqual([]);
        }),
        SETTINGS,
      );
    });
  }
});
