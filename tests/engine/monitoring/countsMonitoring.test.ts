import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import { generateSsiWardMonths } from '../../../src/engine/demo';
import { unitsFromColumn } from '../../../src/engine/monitoring';
import { sigmoid } from '../../../src/engine/numerics/loss';
import { runAnalysis } from '../../../src/engine/workflow/analyse';
import { monitorStep, type MonitoringModel } from '../../../src/engine/workflow/monitorStep';
import { linearPredictorFromRecipe } from '../../../src/engine/design/design';

// A monitoring file of counts (ward-months) counts cases: O = Σ events, E = Σ trials × risk (common practice:
// the expected count of a binomial row is its trials times its risk), per ward and overall.
const demo = generateSsiWardMonths();
const { record } = await runAnalysis(demo.dataset, { spec: demo.spec });
const model: MonitoringModel = {
  ...record.fit,
  source: 'current-fit',
  name: 'ward-month model',
} as unknown as MonitoringModel;
const data = demo.dataset;
// month k of 2024 → epoch day of its 15th
const monthCol = data.columns.find((c) => c.name === 'month')!;
const dates = Float64Array.from(
  monthCol.kind === 'numeric' ? monthCol.values : [],
  (m) => Date.UTC(2024, m - 1, 15) / 86_400_000,
);

describe('monitoring a table of counts with a model fitted on counts', () => {
  const units = unitsFromColumn(data, 'ward');
  const m = monitorStep(model, data, dates, units, { dateColumn: 'month_of_2024', unitColumn: 'ward' });

  it('O is the sum of the events and E the sum of trials × risk, overall and per unit', () => {
    const beta = record.fit.coefficients.map((c) => c.estimate);
    const lp = linearPredictorFromRecipe(record.fit.recipe, beta, data, { outcome: 'ignore' });
    const ops = data.columns.find((c) => c.name === 'operations')!;
    const inf = data.columns.find((c) => c.name === 'infections')!;
    const ward = data.columns.find((c) => c.name === 'ward')!;
    if (ops.kind !== 'numeric' || inf.kind !== 'numeric' || ward.kind !== 'categorical') throw new Error('demo');
    let O = 0,
      E = 0;
    const byWard = new Map<string, { o: number; e: number }>();
    for (let k = 0; k < lp.n; k++) {
      const r = lp.rowsUsed[k];
      const e = ops.values[r] * sigmoid(lp.eta[k]);
      O += inf.values[r];
      E += e;
      const w = ward.levels[ward.codes[r]];
      const cur = byWard.get(w) ?? { o: 0, e: 0 };
      byWard.set(w, { o: cur.o + inf.values[r], e: cur.e + e });
    }
    expect(m.overall.observed).toBe(O);
    expect(m.overall.expected).toBeCloseTo(E, 8);
    expect(m.nUsed).toBe(record.fit.nUsed);
    for (const u of m.funnel!.units) {
      expect(u.observed).toBe(byWard.get(u.unit)!.o);
      expect(u.expected).toBeCloseTo(byWard.get(u.unit)!.e, 8);
    }
    expect(m.warnings.map((w) => w.code)).toContain('monitoring-counts-written-out');
  });

  it('names a row whose events exceed its trials', () => {
    const bad: Dataset = {
      ...data,
      columns: data.columns.map((c) =>
        c.name === 'infections' && c.kind === 'numeric'
          ? { ...c, values: Float64Array.from(c.values, (v, i) => (i === 6 ? 999 : v)) }
          : c,
      ),
    };
    expect(() => monitorStep(model, bad, dates, units, { dateColumn: 'month_of_2024', unitColumn: 'ward' })).toThrow(
      /Row 8: 999 events in "infections" but only \d+ trials in "operations"/,
    );
  });
});
