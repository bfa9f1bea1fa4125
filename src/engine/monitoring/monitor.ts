import { FulcraError } from '../core/data';
import { createRng } from '../numerics/rng';
import { warning, type EngineWarning } from '../core/warnings';
import { citlFit, slopeFit } from './calibrationFit';
import { cusumLimit, cusumWeights, incrementDistribution, runCusumWeights, simulateArl } from './cusum';
import { decimatePath } from './decimate';
import { funnelPlot, type UnitCounts } from './funnel';
import { dayLabel, periodTable } from './periods';
import { observedExpectedRatio } from './poisson';
import type {
  CusumChart,
  MonitoringModelInfo,
  MonitoringOptions,
  MonitoringRecord,
  UnscoredReason,
  UnscoredRow,
} from './types';

/**
 * The scored cases of a monitoring file, sorted by date (ties keep file order). Every array has one entry per
 * case; `unit` holds codes into `unitLevels` (null without a unit column); `row` the spreadsheet row.
 */
export interface MonitoringCases {
  y: Float64Array;
  eta: Float64Array;
  risk: Float64Array;
  date: Float64Array;
  unit: Int32Array | null;
  unitLevels: string[];
  row: Int32Array;
}

/** What the scoring step left out, for the record. */
export interface MonitoringScoringSummary {
  nRows: number;
  unscored: UnscoredRow[];
  unscoredByReason: Record<UnscoredReason, number>;
}

/** Largest total number of simulated cases per chart; fewer runs are simulated beyond it (stated in a warning). */
const SIMULATION_BUDGET = 20_000_000;

/** The case indices of each unit code, in case order (one pass). */
function unitGroups(unit: Int32Array, k: number): Int32Array[] {
  const count = new Int32Array(k);
  for (let i = 0; i < unit.length; i++) count[unit[i]]++;
  const out = Array.from(count, (c) => new Int32Array(c));
  const fill = new Int32Array(k);
  for (let i = 0; i < unit.length; i++) out[unit[i]][fill[unit[i]]++] = i;
  return out;
}

/** Largest number of risks the run-length simulation draws from (a seeded sample of them beyond it). */
const SIMULATION_POOL = 65_536;

/**
 * The risks the simulation draws cases from, with each one's log-likelihood-ratio term y·log R − W (from the chart's
 * weights `w` and the outcomes): all of them, or beyond SIMULATION_POOL a seeded sample with replacement (itself a
 * draw from the empirical distribution), small enough to stay in the processor's cache. The terms are computed for
 * the drawn cases only.
 */
function simulationPool(p: Float64Array, y: Float64Array, w: Float64Array, logR: number, seed: number) {
  const n = p.length;
  const m = Math.min(n, SIMULATION_POOL);
  const rng = n > SIMULATION_POOL ? createRng(seed ^ 0x5bd1e995) : null;
  const sp = rng ? new Float64Array(m) : p,
    sl = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    const k = rng ? rng.int(n) : i;
    if (rng) sp[i] = p[k];
    sl[i] = y[k] * logR - w[k];
  }
  return { p: sp, logTerm: sl };
}

/** Each unit's cases in case order: their dates (one gather, shared by both charts). */
interface UnitCases {
  groups: Int32Array[];
  dates: Float64Array[];
}

function unitCases(cases: MonitoringCases): UnitCases | null {
  if (!cases.unit) return null;
  const groups = unitGroups(cases.unit, cases.unitLevels.length);
  const dates = groups.map((idx) => {
    const d = new Float64Array(idx.length);
    for (let k = 0; k < idx.length; k++) d[k] = cases.date[idx[k]];
    return d;
  });
  return { groups, dates };
}

/**
 * Every unit's own CUSUM in one pass over the cases in case order (the same sums, restarts and signals as running
 * runCusumWeights on each unit's weights): each unit's values land in its own array, no gathers.
 */
function unitCharts(w: Float64Array, unit: Int32Array, units: UnitCases, h: number, sign: 1 | -1) {
  const k = units.groups.length;
  const values = units.groups.map((g) => new Float64Array(g.length));
  const signals: number[][] = Array.from({ length: k }, () => []);
  const x = new Float64Array(k);
  const pos = new Int32Array(k);
  for (let i = 0; i < w.length; i++) {
    const u = unit[i];
    let v = x[u] + w[i];
    if (v < 0) v = 0;
    const t = pos[u]++;
    values[u][t] = sign * v;
    if (v >= h) {
      signals[u].push(t);
      v = 0;
    }
    x[u] = v;
  }
  return { values, signals };
}

function chart(
  cases: MonitoringCases,
  direction: 'deteriorate' | 'improve',
  o: MonitoringOptions,
  seed: number,
  warnings: EngineWarning[],
  units: UnitCases | null,
): CusumChart {
  const oddsRatio = o.oddsRatio[direction];
  const sign = direction === 'deteriorate' ? 1 : -1;
  const dist = incrementDistribution(cases.risk, oddsRatio, 2000, cases.eta);
  const { h, arl0 } = cusumLimit(dist, o.targetArl0, o.markovStates);
  const w = cusumWeights(cases.y, cases.risk, oddsRatio);
  const logR = Math.log(oddsRatio);
  const run = runCusumWeights(w, h, sign);
  const runs = Math.max(20, Math.min(o.simulationRuns, Math.floor(SIMULATION_BUDGET / o.targetArl0)));
  if (runs < o.simulationRuns)
    warnings.push(
      warning(
        'cusum-simulation-shortened',
        `The ${direction === 'deteriorate' ? 'deterioration' : 'improvement'} chart's run length was checked on ` +
          `${runs} simulated runs instead of ${o.simulationRuns}, to keep the check fast at this target.`,
        'Read the simulated run length with its Monte-Carlo standard error.',
      ),
    );
  const pool = simulationPool(cases.risk, cases.y, w, logR, seed);
  const sim = simulateArl(pool.p, oddsRatio, h, runs, seed, Math.ceil(20 * o.targetArl0), pool.logTerm);
  const signals = run.signals.map((t) => ({
    case: t + 1,
    date: cases.date[t],
    dateLabel: dayLabel(cases.date[t]),
    unit: cases.unit ? (cases.unitLevels[cases.unit[t]] ?? null) : null,
    row: cases.row[t],
    value: run.values[t],
  }));
  let byUnit: CusumChart['byUnit'] = null;
  if (units && cases.unit) {
    const per = unitCharts(w, cases.unit, units, h, sign);
    byUnit = cases.unitLevels.flatMap((name, u) => {
      const idx = units.groups[u];
      if (idx.length === 0) return [];
      const values = per.values[u],
        d = units.dates[u];
      return [
        {
          unit: name,
          n: idx.length,
          path: decimatePath(values, d, Math.max(100, Math.floor(o.drawPoints / 4))),
          signals: per.signals[u].map((t) => ({
            case: t + 1,
            date: d[t],
            dateLabel: dayLabel(d[t]),
            unit: name,
            row: cases.row[idx[t]],
            value: values[t],
          })),
          final: values[idx.length - 1],
        },
      ];
    });
  }
  return {
    byUnit,
    direction,
    oddsRatio,
    h,
    targetArl0: o.targetArl0,
    arl0Markov: arl0,
    markovStates: o.markovStates,
    arl0Simulated: sim,
    path: decimatePath(run.values, cases.date, o.drawPoints),
    signals,
    final: cases.y.length ? run.values[cases.y.length - 1] : 0,
  };
}

/**
 * Risk-adjusted monitoring of scored cases (sorted by date): overall O/E and calibration, the funnel plot by unit,
 * the two CUSUMs with their limits and run-length checks, the cumulative O − E, and calibration by period.
 * Every statistic uses every case; only the drawn paths are decimated.
 */
export function monitorCases(
  cases: MonitoringCases,
  options: MonitoringOptions,
  model: MonitoringModelInfo,
  scoring: MonitoringScoringSummary,
): MonitoringRecord {
  const n = cases.y.length;
  if (n === 0)
    throw new FulcraError(
      'no-monitoring-cases',
      'No row of the monitoring file could be scored with a date and an outcome.',
      'Check the date column and that the file has the columns the model uses.',
    );
  for (let i = 1; i < n; i++)
    if (cases.date[i] < cases.date[i - 1])
      throw new FulcraError('internal', 'Monitoring cases must be sorted by date.');
  const warnings: EngineWarning[] = [];
  const { y, risk, eta, date } = cases;
  const level = options.level;

  let o = 0,
    e = 0;
  const vlad = new Float64Array(n);
  const expNeg = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    o += y[i];
    e += risk[i];
    vlad[i] = o - e;
    expNeg[i] = Math.exp(-eta[i]);
  }
  // started at log(O/E), close to α when the risks are small
  const citl = citlFit(y, eta, level, 0, n, o > 0 && e > 0 ? Math.log(o / e) : 0, expNeg);
  const slope = slopeFit(y, eta, level);
  if (!citl || !slope)
    warnings.push(
      warning(
        'monitoring-calibration-undefined',
        'Calibration-in-the-large or the calibration slope could not be estimated on the monitoring cases ' +
          '(they are all events or all non-events, or the risks do not vary).',
        'Monitor more cases, or read O/E alone.',
      ),
    );
  const overall = {
    n,
    observed: o,
    expected: e,
    oe: observedExpectedRatio(o, e, level),
    oMinusE: o - e,
    calibrationInTheLarge: citl,
    calibrationSlope: slope ? slope.slope : null,
    level,
  };

  let funnel: MonitoringRecord['funnel'] = null;
  if (cases.unit) {
    const counts: UnitCounts[] = cases.unitLevels.map((unit) => ({ unit, n: 0, observed: 0, expected: 0 }));
    for (let i = 0; i < n; i++) {
      const c = counts[cases.unit[i]];
      c.n++;
      c.observed += y[i];
      c.expected += risk[i];
    }
    funnel = funnelPlot(
      counts.filter((c) => c.n > 0),
      options.funnelLevels,
      level,
      options.overdispersion,
    );
    const out = funnel.units.filter((u) => u.flag === 'above-outer' || u.flag === 'below-outer');
    if (out.length)
      warnings.push(
        warning(
          'funnel-outside-limits',
          `${out.map((u) => u.unit).join(', ')} ${out.length === 1 ? 'lies' : 'lie'} outside the ` +
            `${(options.funnelLevels[1] * 100).toFixed(1)} % funnel limits.`,
          'A point outside the limits is a prompt to look at that unit’s cases, not proof of worse care.',
          out.map((u) => u.unit),
        ),
      );
  }

  const units = unitCases(cases);
  const deteriorate = chart(cases, 'deteriorate', options, options.seed, warnings, units);
  const improve = chart(cases, 'improve', options, options.seed + 1, warnings, units);
  const periods = periodTable(y, eta, risk, date, options.period, level, citl?.estimate ?? 0, expNeg);
  if (periods.length < 2)
    warnings.push(
      warning(
        'one-period-only',
        `All monitored cases fall in one ${options.period}, so there is no drift to show.`,
        `Monitor a longer span, or choose ${options.period === 'quarter' ? 'months' : 'a shorter period'}.`,
      ),
    );
  if (scoring.unscored.length > 0) {
    const total = scoring.nRows - n;
    const first = scoring.unscored
      .slice(0, 5)
      .map((u) => `row ${u.row} (${u.reason.replace('-', ' ')} in "${u.column}")`)
      .join('; ');
    warnings.push(
      warning(
        'monitoring-rows-unscored',
        `${total} of ${scoring.nRows} rows were not monitored: ${first}${total > 5 ? '; …' : '.'}`,
        'Fill in or correct those cells; the unscored list names every row and its reason.',
      ),
    );
  }
  return {
    options,
    model,
    nRows: scoring.nRows,
    nUsed: n,
    nUnscored: scoring.nRows - n,
    unscoredByReason: scoring.unscoredByReason,
    unscored: scoring.unscored,
    dateRange: { first: date[0], last: date[n - 1], firstLabel: dayLabel(date[0]), lastLabel: dayLabel(date[n - 1]) },
    overall,
    funnel,
    cusum: { deteriorate, improve },
    vlad: { convention: 'observed-minus-expected', path: decimatePath(vlad, date, options.drawPoints), final: o - e },
    periods,
    warnings,
  };
}
