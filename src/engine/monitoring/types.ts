import { FulcraError } from '../core/data';
import type { EngineWarning } from '../core/warnings';
import type { IntervalEstimate } from '../evaluation/calibration';
import type { RecalibratedModel, RecalibrationResult } from '../validation/recalibration';

/**
 * The contract of risk-adjusted monitoring (issue 15): a fitted model applied to later cases with an outcome, a
 * date and optionally a unit (ward, team…). One record, `MonitoringRecord`, is what the worker returns, what the
 * page draws, what the PDF prints and what `npm run fit -- --monitor FILE --json` prints under `monitoring`.
 *
 * Conventions used throughout:
 * - dates are epoch days (days since 1970-01-01 UTC, as the importer stores date columns); the engine takes
 *   them as numbers, the io layer turns text and spreadsheet serial dates into them (`src/io/monitoringDates.ts`);
 *   every date also has a `YYYY-MM-DD` label so callers need no date code;
 * - cases are taken in date order (ties keep file order); "case k" is the k-th scored case in that order,
 *   counted from 1;
 * - `row` is always the spreadsheet row number (header = row 1), as everywhere in Fulcra;
 * - O = observed events, E = expected events = Σ model risks; O/E intervals are exact Poisson (Garwood).
 */

/** Calendar period for calibration drift. */
export type MonitoringPeriod = 'month' | 'quarter';

export interface MonitoringOptions {
  /** Column holding each case's date (a date column, spreadsheet serial dates or date text). */
  dateColumn: string;
  /** Column naming each case's unit (ward, team, line, shift); null: no funnel plot, one overall unit. */
  unitColumn: string | null;
  /** Calendar period of the drift table. Default 'month'. */
  period: MonitoringPeriod;
  /**
   * Odds-ratio shifts of the two risk-adjusted CUSUMs (Steiner et al. 2000): R_A under the alternative.
   * Default {deteriorate: 2 (odds doubled), improve: 0.5 (odds halved)}.
   */
  oddsRatio: { deteriorate: number; improve: number };
  /** Target in-control average run length, in cases, that sets each chart's limit h. Default 5000. */
  targetArl0: number;
  /** Confidence level of O/E and calibration intervals. Default 0.95. */
  level: number;
  /** The two funnel-limit levels, inner then outer. Default [0.95, 0.998] (Spiegelhalter 2005). */
  funnelLevels: [number, number];
  /** Also give overdispersion-adjusted funnel limits (multiplicative φ; see `FunnelOverdispersion`). Default false. */
  overdispersion: boolean;
  /** Seed of the simulation that checks each chart's run length. Default 1. */
  seed: number;
  /** In-control runs simulated to check the Markov-chain ARL0. Default 300. */
  simulationRuns: number;
  /** States of the Markov chain discretising [0, h]. Default 200. */
  markovStates: number;
  /** Most points kept in each drawn path (min/max per bucket; signals are never decimated). Default 2000. */
  drawPoints: number;
}

export const MONITORING_DEFAULTS: Omit<MonitoringOptions, 'dateColumn'> = {
  unitColumn: null,
  period: 'month',
  oddsRatio: { deteriorate: 2, improve: 0.5 },
  targetArl0: 5000,
  level: 0.95,
  funnelLevels: [0.95, 0.998],
  overdispersion: false,
  seed: 1,
  simulationRuns: 300,
  markovStates: 200,
  drawPoints: 2000,
};

export type MonitoringOptionsInput = Partial<MonitoringOptions> & { dateColumn: string };

const KEYS = new Set<string>(['dateColumn', ...Object.keys(MONITORING_DEFAULTS)]);

function bad(field: string, message: string, hint: string): never {
  throw new FulcraError('bad-monitoring-option', `Monitoring option "${field}": ${message}`, hint);
}

/** Fills the defaults and checks every option; a bad value throws FulcraError('bad-monitoring-option') naming it. */
export function resolveMonitoringOptions(input: MonitoringOptionsInput): MonitoringOptions {
  for (const k of Object.keys(input))
    if (!KEYS.has(k)) bad(k, 'is not a monitoring option.', `Known options: ${[...KEYS].join(', ')}.`);
  const o: MonitoringOptions = {
    ...MONITORING_DEFAULTS,
    ...input,
    oddsRatio: { ...MONITORING_DEFAULTS.oddsRatio, ...input.oddsRatio },
  };
  if (typeof o.dateColumn !== 'string' || o.dateColumn.trim() === '')
    bad('dateColumn', 'is required.', 'Name the column that holds each case’s date.');
  if (o.unitColumn !== null && (typeof o.unitColumn !== 'string' || o.unitColumn.trim() === ''))
    bad('unitColumn', 'must be a column name or null.', 'Name the unit column, or leave it out.');
  if (o.unitColumn !== null && o.unitColumn === o.dateColumn)
    bad('unitColumn', 'is the same column as the date.', 'Choose a column that names the ward, team or unit.');
  if (o.period !== 'month' && o.period !== 'quarter')
    bad('period', `is "${String(o.period)}".`, 'Use "month" or "quarter".');
  const { deteriorate, improve } = o.oddsRatio;
  if (!(Number.isFinite(deteriorate) && deteriorate > 1))
    bad('oddsRatio.deteriorate', `is ${deteriorate}; it must be above 1.`, 'Use 2 to detect a doubling of the odds.');
  if (!(Number.isFinite(improve) && improve > 0 && improve < 1))
    bad('oddsRatio.improve', `is ${improve}; it must be between 0 and 1.`, 'Use 0.5 to detect a halving of the odds.');
  if (!(Number.isFinite(o.targetArl0) && o.targetArl0 >= 10 && o.targetArl0 <= 1e6))
    bad('targetArl0', `is ${o.targetArl0}.`, 'Give an in-control average run length between 10 and 1 000 000 cases.');
  if (!(o.level > 0.5 && o.level < 1)) bad('level', `is ${o.level}.`, 'Use a confidence level such as 0.95.');
  const [inner, outer] = o.funnelLevels ?? [];
  if (!(inner > 0.5 && outer < 1 && inner < outer))
    bad('funnelLevels', `are ${String(o.funnelLevels)}.`, 'Give two levels, inner below outer, e.g. [0.95, 0.998].');
  if (typeof o.overdispersion !== 'boolean') bad('overdispersion', 'must be true or false.', 'Use true or false.');
  if (!Number.isInteger(o.seed)) bad('seed', `is ${o.seed}.`, 'Use a whole number.');
  if (!(Number.isInteger(o.simulationRuns) && o.simulationRuns >= 20 && o.simulationRuns <= 100_000))
    bad('simulationRuns', `is ${o.simulationRuns}.`, 'Use a whole number from 20 to 100 000.');
  if (!(Number.isInteger(o.markovStates) && o.markovStates >= 20 && o.markovStates <= 2000))
    bad('markovStates', `is ${o.markovStates}.`, 'Use a whole number from 20 to 2000.');
  if (!(Number.isInteger(o.drawPoints) && o.drawPoints >= 100 && o.drawPoints <= 100_000))
    bad('drawPoints', `is ${o.drawPoints}.`, 'Use a whole number from 100 to 100 000.');
  return o;
}

/** Why a row of the monitoring file was not scored (`column` names the column concerned). */
export type UnscoredReason = 'missing-value' | 'unknown-category' | 'missing-outcome' | 'missing-date' | 'missing-unit';

export interface UnscoredRow {
  /** Spreadsheet row number. */
  row: number;
  reason: UnscoredReason;
  column: string;
  /** The unseen category (reason 'unknown-category'), else null. */
  value: string | null;
}

/** A ratio with its interval; `estimate` is null when E = 0. */
export interface RatioInterval {
  estimate: number | null;
  lower: number | null;
  upper: number | null;
}

/** O/E with its exact Poisson interval (Garwood 1936): O's chi-square limits divided by E. */
export interface ObservedExpected {
  n: number;
  observed: number;
  expected: number;
  oe: RatioInterval;
  /** O − E. */
  oMinusE: number;
}

export interface MonitoringOverall extends ObservedExpected {
  /** α in logit P(y) = α + offset(LP), Wald interval at `level`; null when not estimable (one class only). */
  calibrationInTheLarge: IntervalEstimate | null;
  /** b in logit P(y) = a + b·LP; null when not estimable. */
  calibrationSlope: IntervalEstimate | null;
  level: number;
}

/** Where a unit's O/E sits against the funnel limits. */
export type FunnelFlag = 'above-outer' | 'above-inner' | 'within' | 'below-inner' | 'below-outer';

export interface FunnelLimits {
  /** Inner (e.g. 95 %) limits on the O/E scale. */
  inner: { lower: number; upper: number };
  /** Outer (e.g. 99.8 %) limits on the O/E scale. */
  outer: { lower: number; upper: number };
}

export interface FunnelUnit extends ObservedExpected {
  unit: string;
  /** Exact-Poisson limits at this unit's E (Spiegelhalter 2005 interpolation). */
  limits: FunnelLimits;
  flag: FunnelFlag;
  /** Overdispersion-adjusted limits and flag; null unless options.overdispersion. */
  adjustedLimits: FunnelLimits | null;
  adjustedFlag: FunnelFlag | null;
}

/** Funnel limit curves over a grid of expected counts, for drawing (O/E scale, target 1). */
export interface FunnelCurves {
  expected: number[];
  innerLower: number[];
  innerUpper: number[];
  outerLower: number[];
  outerUpper: number[];
}

/**
 * Multiplicative overdispersion (Spiegelhalter 2005, §4; Spiegelhalter et al. 2012 JRSS A 175:1): z-scores
 * zᵢ = (Oᵢ − Eᵢ)/√Eᵢ winsorised at their 10th and 90th percentiles, φ = Σz²/k (k units). When φ > 1 the limits
 * become 1 ± (zₚ·√(φ/E)) (normal approximation, inflated); φ ≤ 1 keeps the exact limits.
 */
export interface FunnelOverdispersion {
  phi: number;
  /** Units in the estimate. */
  units: number;
  /** Winsorising percentiles used, e.g. [0.1, 0.9]. */
  winsorised: [number, number];
  /** True when φ > 1 and the adjusted limits differ from the exact ones. */
  applied: boolean;
  curves: FunnelCurves;
}

export interface MonitoringFunnel {
  levels: [number, number];
  /** Units sorted by name; units with E = 0 are listed with null O/E and flag 'within'. */
  units: FunnelUnit[];
  curves: FunnelCurves;
  overdispersion: FunnelOverdispersion | null;
}

/** A decimated path for drawing: min/max per bucket of cases, first and last kept. Never used for computing. */
export interface DrawPath {
  /** Case number (1-based, date order). */
  case: number[];
  /** Epoch day of that case. */
  date: number[];
  value: number[];
}

export interface CusumSignal {
  /** Case number (1-based, date order) at which the chart crossed its limit. */
  case: number;
  date: number;
  dateLabel: string;
  unit: string | null;
  /** Spreadsheet row of that case. */
  row: number;
  /** Chart value at the signal (≥ h, or ≤ −h for the improvement chart). */
  value: number;
}

/**
 * A risk-adjusted Bernoulli CUSUM (Steiner, Cook, Farewell & Treasure 2000, Biostatistics 1:441). Weight of
 * case t with risk pₜ and outcome yₜ for odds ratio R_A: Wₜ = yₜ·log R_A − log(1 − pₜ + R_A·pₜ).
 * Deterioration (R_A > 1): Xₜ = max(0, Xₜ₋₁ + Wₜ), signal when Xₜ ≥ h. Improvement (R_A < 1): drawn below zero,
 * Xₜ = min(0, Xₜ₋₁ − Wₜ), signal when Xₜ ≤ −h. After a signal the chart restarts at 0.
 */
export interface CusumChart {
  direction: 'deteriorate' | 'improve';
  oddsRatio: number;
  /** Control limit (positive; the improvement chart signals at −h). */
  h: number;
  targetArl0: number;
  /** In-control ARL at h by the Markov chain on the empirical risk distribution (cases). */
  arl0Markov: number;
  markovStates: number;
  /** The same ARL by seeded simulation: mean run length, its Monte-Carlo SE, runs, runs stopped unsignalled. */
  arl0Simulated: { mean: number; se: number; runs: number; censored: number; seed: number };
  /** Path for drawing, decimated; values in the chart's sign. */
  path: DrawPath;
  /** Every signal, at full resolution. */
  signals: CusumSignal[];
  /** Chart value after the last case. */
  final: number;
  /**
   * The same chart run on each unit's own cases (in date order) with the same h, so a signal names the unit;
   * null without a unit column. The in-control run length per unit differs a little from the overall one when a
   * unit's case mix differs from the whole.
   */
  byUnit: CusumUnitChart[] | null;
}

export interface CusumUnitChart {
  unit: string;
  n: number;
  /** Path for drawing (decimated to drawPoints/4 points), case numbers counted within the unit. */
  path: DrawPath;
  /** Every signal; `case` is counted within the unit, `row` is the spreadsheet row. */
  signals: CusumSignal[];
  final: number;
}

/**
 * Cumulative O − E case by case (variable life-adjusted display, Lovegrove et al. 1997, Br J Surg 84:1509, plot
 * E − O, "lives saved"); Fulcra plots O − E, so the curve rises when there are more events than expected.
 */
export interface MonitoringVlad {
  convention: 'observed-minus-expected';
  path: DrawPath;
  final: number;
}

export interface MonitoringPeriodRow extends ObservedExpected {
  /** "2025-03" (month) or "2025 Q1" (quarter). */
  label: string;
  /** First day of the period and first day of the next (epoch days). */
  start: number;
  end: number;
  /** Calibration-in-the-large in the period with Wald interval; null when not estimable. */
  citl: IntervalEstimate | null;
}

export interface MonitoringModelInfo {
  source: 'current-fit' | 'model-file';
  /** The model file's name, or "current fit". */
  name: string;
  outcome: string;
  event: string;
}

export interface MonitoringRecord {
  options: MonitoringOptions;
  model: MonitoringModelInfo;
  nRows: number;
  /** Rows scored and monitored. */
  nUsed: number;
  nUnscored: number;
  /** Unscored rows by reason (counts of all). */
  unscoredByReason: Record<UnscoredReason, number>;
  /** The first 1000 unscored rows in file order (row, reason, column, value). */
  unscored: UnscoredRow[];
  dateRange: { first: number; last: number; firstLabel: string; lastLabel: string };
  overall: MonitoringOverall;
  /** Null without a unit column. */
  funnel: MonitoringFunnel | null;
  cusum: { deteriorate: CusumChart; improve: CusumChart };
  vlad: MonitoringVlad;
  periods: MonitoringPeriodRow[];
  warnings: EngineWarning[];
}

/** Options of `recalibrateOnPeriods`: the latest `periods` periods of the record (≥ 1). */
export interface RecalibrateOnPeriodsOptions {
  periods: number;
  level?: number;
}

/** Logistic recalibration (intercept and slope) on the cases of the latest periods. */
export interface RecalibrationOnPeriods {
  /** Labels of the periods used, oldest first. */
  periods: string[];
  nUsed: number;
  events: number;
  /** New intercept a and slope b of logit P(y) = a + b·LP, with Wald intervals; slope null when not estimable. */
  intercept: IntervalEstimate | null;
  slope: IntervalEstimate | null;
  /** Both fits (intercept only, intercept and slope). */
  recalibration: RecalibrationResult;
  /** The updated model (intercept and slope; intercept only when the slope cannot be estimated); null if neither. */
  model: RecalibratedModel | null;
  warnings: EngineWarning[];
}
