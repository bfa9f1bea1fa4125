import type { Dataset } from '../../engine/core';
import { createRng } from '../../engine/numerics';
import { monitorScored, type MonitoringModel } from '../../engine/workflow';
import type { Measurement } from './extras';

/**
 * Risk-adjusted monitoring at n rows (issue 15: ≤ 1 s at 10⁶): a seeded file of 5 numeric predictors, 20 units
 * and two years of dates is scored with a fixed model and charted — O/E, funnel, both CUSUMs with their limits
 * (Markov chain) and simulated run lengths, cumulative O − E, months — by the engine's monitorScored, as the worker
 * runs it (dates already read as epoch days; the file import is measured by the CSV-import row).
 */
export function monitoringCost(n: number, seed: number): Measurement {
  const rng = createRng(seed);
  const p = 5;
  const columns: Dataset['columns'] = [];
  const beta = [-3, 0.4, -0.3, 0.2, 0.5, -0.1];
  const eta = new Float64Array(n).fill(beta[0]);
  for (let j = 0; j < p; j++) {
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      v[i] = rng.normal();
      eta[i] += beta[j + 1] * v[i];
    }
    columns.push({ kind: 'numeric', name: `x${j + 1}`, values: v });
  }
  const y = new Float64Array(n),
    unit = new Int32Array(n),
    dates = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta[i])) ? 1 : 0;
    unit[i] = rng.int(20);
    dates[i] = 20089 + Math.floor((i * 730) / n);
  }
  columns.push({ kind: 'numeric', name: 'y', values: y });
  columns.push({
    kind: 'categorical',
    name: 'unit',
    levels: Array.from({ length: 20 }, (_, k) => `U${k + 1}`),
    codes: unit,
  });
  const names = Array.from({ length: p }, (_, j) => `x${j + 1}`);
  const model: MonitoringModel = {
    source: 'current-fit',
    name: 'bench',
    recipe: {
      outcome: 'y',
      event: '1',
      terms: names.map((c) => ({ type: 'numeric' as const, name: c, column: c })),
      columnNames: ['(Intercept)', ...names],
    },
    coefficients: ['(Intercept)', ...names].map((name, j) => ({ name, estimate: beta[j] })),
  };
  const data: Dataset = { nRows: n, columns };
  const c0 = process.cpuUsage();
  const t0 = process.hrtime.bigint();
  const { record } = monitorScored(model, data, dates, null, { dateColumn: 'date', unitColumn: 'unit', seed });
  const wall = Number(process.hrtime.bigint() - t0) / 1e9;
  const c = process.cpuUsage(c0);
  const d = record.cusum.deteriorate;
  return {
    name: `monitoring at n = ${n}`,
    value: wall,
    unit: 's',
    cpuSeconds: (c.user + c.system) / 1e6,
    detail:
      `score ${n} rows, 20 units, 24 months; both CUSUMs (h ${d.h.toFixed(3)} for ARL0 ${d.targetArl0}, Markov ` +
      `${d.arl0Markov.toFixed(0)}, simulated ${d.arl0Simulated.mean.toFixed(0)} ± ${d.arl0Simulated.se.toFixed(0)} ` +
      `over ${d.arl0Simulated.runs} runs), funnel, O − E, months; drawn path ${d.path.case.length} points`,
  };
}
