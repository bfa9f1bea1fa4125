import { join } from 'node:path';
import { bootstrapValidation } from '../../engine/validation';
import type { Dataset } from '../../engine/core';
import { fit } from '../../engine/fitting';
import { lossSurface } from '../../engine/fitting';
import type { ModelSpec } from '../../engine/core';
import { createRng } from '../../engine/numerics';
import { atThreshold, prepareThresholds } from '../../engine/evaluation';
import { runJson } from './run';
import { ensureSynth, readBin, type SynthFiles } from './synth';

/** One timed measurement of the benchmark besides the model fits. */
export interface Measurement {
  name: string;
  value: number;
  unit: string;
  detail: string;
  /** CPU seconds (user + system) of the timed part: on a shared machine this is steadier than wall time. */
  cpuSeconds?: number;
}

const seconds = (t0: bigint): number => Number(process.hrtime.bigint() - t0) / 1e9;
const cpu = (c0: NodeJS.CpuUsage): number => {
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1e6;
};

/** The synthetic data set as an engine Dataset (numeric x1..xp and y). */
export function synthDataset(f: SynthFiles): Dataset {
  const X = readBin(f.xBin);
  const columns: Dataset['columns'] = [];
  for (let j = 0; j < f.p; j++)
    columns.push({ kind: 'numeric', name: `x${j + 1}`, values: X.slice(j * f.n, (j + 1) * f.n) });
  columns.push({ kind: 'numeric', name: 'y', values: readBin(f.yBin) });
  return { nRows: f.n, columns };
}

const mainEffects = (p: number): ModelSpec => ({
  outcome: 'y',
  event: '1',
  terms: Array.from({ length: p }, (_, j) => ({ type: 'main' as const, column: `x${j + 1}` })),
});

/** CSV import throughput through src/io importFile (the worker's import): the median of 3 fresh child processes. */
export async function csvImport(dir: string, n: number, p: number, seed: number): Promise<Measurement> {
  const f = ensureSynth(dir, n, p, seed);
  const name = `CSV import ${n}×${p + 1}`;
  type ImportRun = { bytes: number; seconds: number; cpuSeconds: number; nRows: number; columns: number };
  const runs: ImportRun[] = [];
  for (let k = 0; k < 3; k++) {
    const r = runJson<ImportRun>(process.execPath, [
      '--import',
      'tsx',
      // from the sources (as run.ts starts fitChild.ts): `npm run bench` itself runs from the esbuild build
      join(process.cwd(), 'src', 'cli', 'bench', 'importChild.ts'),
      f.csv,
    ]);
    if (!r.ok) return { name, value: NaN, unit: 'MB/s', detail: `ERROR ${r.error}` };
    runs.push(r.value);
  }
  runs.sort((a, b) => a.seconds - b.seconds);
  const v = runs[1];
  const ok = runs.every((u) => u.nRows === n && u.columns === p + 1);
  return {
    name,
    value: v.bytes / 1e6 / v.seconds,
    unit: 'MB/s',
    cpuSeconds: v.cpuSeconds,
    detail:
      `${(v.bytes / 1e6).toFixed(1)} MB in ${v.seconds.toFixed(2)} s ` +
      `(median of 3 fresh processes: ${runs.map((u) => u.seconds.toFixed(2)).join(' / ')} s) ` +
      `through importFile (file already in memory)${ok ? '' : '; WRONG SHAPE ' + v.nRows + '×' + v.columns}`,
  };
}

/** prepareThresholds once, then the median time of `queries` atThreshold calls at random thresholds. */
export function thresholdQueries(n: number, queries: number, seed: number): Measurement[] {
  const rng = createRng(seed);
  const risk = new Float64Array(n),
    y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = 1 / (1 + Math.exp(-(1.4 * rng.normal() - 1.2)));
    risk[i] = Math.round(r * 1e6) / 1e6;
    y[i] = rng.next() < r ? 1 : 0;
  }
  const c0 = process.cpuUsage();
  let t0 = process.hrtime.bigint();
  const prep = prepareThresholds(y, risk);
  const prepS = seconds(t0),
    prepC = cpu(c0);
  const times = new Float64Array(queries);
  let sink = 0;
  for (let q = 0; q < queries; q++) {
    const t = rng.next();
    t0 = process.hrtime.bigint();
    sink += atThreshold(prep, t, { costs: { missedCase: 10, falseAlarm: 1 } }).tp;
    times[q] = seconds(t0);
  }
  times.sort();
  return [
    {
      name: `threshold query at n = ${n}`,
      value: times[queries >> 1] * 1e3,
      unit: 'ms',
      detail:
        `median of ${queries} atThreshold calls ` +
        `(99th percentile ${(times[Math.floor(queries * 0.99)] * 1e3).toFixed(4)} ms) ` +
        `after one prepareThresholds; checksum ${sink}`,
    },
    {
      name: `threshold prepare at n = ${n}`,
      value: prepS,
      unit: 's',
      cpuSeconds: prepC,
      detail: 'prepareThresholds (one sort)',
    },
  ];
}

/** Optimism-corrected bootstrap (the whole ML procedure per replicate). */
export async function bootstrap(dir: string, n: number, p: number, B: number, seed: number): Promise<Measurement> {
  const data = synthDataset(ensureSynth(dir, n, p, seed));
  const c0 = process.cpuUsage(),
    t0 = process.hrtime.bigint();
  const r = await bootstrapValidation(
    { data, spec: mainEffects(p), fitOptions: {}, penalty: null, seed: 1 },
    { B, seed: 1 },
  );
  const s = seconds(t0),
    c = cpu(c0);
  return {
    name: `bootstrap B = ${B} at ${n}×${p}`,
    value: s,
    unit: 's',
    cpuSeconds: c,
    detail: `bootstrapValidation; ${r.failed} failed replicates, corrected AUC ${r.rows[0].corrected?.toFixed(4)}`,
  };
}

/** Loss surface on a G×G grid for the first two slopes of an ML fit. */
export function surface(dir: string, n: number, p: number, grid: number, seed: number): Measurement {
  const data = synthDataset(ensureSynth(dir, n, p, seed));
  const res = fit(data, mainEffects(p), { profile: false });
  const c0 = process.cpuUsage(),
    t0 = process.hrtime.bigint();
  const ls = lossSurface(res, data, { i: 1, j: 2, grid });
  const s = seconds(t0),
    c = cpu(c0);
  return {
    name: `loss surface ${grid}×${grid} at ${n}×${p}`,
    value: s,
    unit: 's',
    cpuSeconds: c,
    detail: `lossSurface (grid + Newton path); ${ls.z.length} points`,
  };
}
