import { FulcraError, sheetRow, type Dataset } from '../core/data';
import type { FitOptions, ModelSpec } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { findAliased } from '../design/aliasing';
import { buildDesign, type Design } from '../design/design';
import { allocDesign, standardiseInPlace } from '../numerics/rowPool';
import { checkExtremeValues } from './extremeValues';
import type { Standardised } from '../numerics/standardise';
import type { LogisticProblem } from './newton';

/**
 * Everything the fit and its profiles share. To save memory the design matrix is standardised in place:
 * design.X holds the centred and scaled columns (std.Z is the same array).
 */
export interface PreparedFit {
  design: Design;
  std: Standardised;
  /** Indices of the non-aliased design columns, in order (0 = intercept). */
  keep: number[];
  aliased: boolean[];
  /** Problem on the standardised kept columns. */
  problem: LogisticProblem;
  warnings: EngineWarning[];
}

/**
 * The rows left with a value in every used column all have one outcome, and rows were left out for missing values
 * (typically the short rows of a ragged file): names the rows left out and the column missing most often.
 */
function fewRowsLeft(data: Dataset, spec: ModelSpec, design: Design, events: number): FulcraError {
  const { n, nDropped, rowsUsed, droppedByColumn } = design;
  const used = new Set(rowsUsed);
  const left: number[] = [];
  for (let r = 0; r < data.nRows && left.length < 10; r++) if (!used.has(r)) left.push(sheetRow(data, r));
  const [worst, count] = Object.entries(droppedByColumn).sort((a, b) => b[1] - a[1])[0] ?? ['', 0];
  const total = n + nDropped;
  return new FulcraError(
    'one-outcome-class',
    `Only ${n} of the ${total} rows have a value in every column the model uses, and ` +
      `${n === 1 ? 'that row has' : 'they all have'} the same outcome (${events === 0 ? 'no' : 'all'} ` +
      `"${design.recipe.event}" events in "${spec.outcome}"). ` +
      `${nDropped} ${nDropped === 1 ? 'row was' : 'rows were'} left out for missing values: ` +
      `${nDropped === 1 ? 'row' : 'rows'} ${left.join(', ')}${nDropped > left.length ? ', …' : ''}` +
      (worst ? `; "${worst}" is missing in ${count} of them.` : '.'),
    'If those rows have fewer cells than the header (a ragged file), correct the file so that every row has all ' +
      'its cells; otherwise leave out the predictors with the most missing values, or impute them.',
  );
}

/** Builds the design, checks the outcome classes, standardises, drops aliased columns and sets up the problem. */
export function prepareFit(data: Dataset, spec: ModelSpec, o: FitOptions): PreparedFit {
  const design = buildDesign(data, spec);
  const warnings = [...design.warnings];
  const { X, n, p, y, weights } = design;
  checkExtremeValues(data, spec, design.rowsUsed);
  let events = 0;
  let cases = 0;
  for (let i = 0; i < n; i++) {
    const w = weights ? weights[i] : 1;
    events += w * y[i];
    cases += w;
  }
  if ((events === 0 || events === cases) && design.nDropped > 0) throw fewRowsLeft(data, spec, design, events);
  if (events === 0 || events === cases) {
    throw new FulcraError(
      'one-outcome-class',
      `Every one of the ${cases} ${weights ? 'cases' : 'rows'} used has the same outcome ` +
        `(${events === 0 ? 'no' : 'all'} "${design.recipe.event}" events in "${spec.outcome}"); ` +
        'a risk model needs both events and non-events.',
      'Check the outcome column and the event level.',
    );
  }
  const std = standardiseInPlace(X, n, p);
  const ali = findAliased(std.Z, n, p, design.columnNames, design.columnTerms);
  warnings.push(...ali.warnings);
  const keep = ali.aliased.flatMap((a, j) => (a ? [] : [j]));
  let Zk = std.Z;
  if (keep.length < p) {
    Zk = allocDesign(n, keep.length);
    keep.forEach((j, k) => Zk.set(std.Z.subarray(j * n, (j + 1) * n), k * n));
  }
  const problem: LogisticProblem = { X: Zk, n, p: keep.length, y };
  if (weights) problem.weights = weights;
  if (o.method === 'ridge') problem.penalty = Float64Array.from(keep, (j) => (j === 0 ? 0 : o.lambda));
  if (o.method === 'firth') problem.firth = true;
  return { design, std, keep, aliased: ali.aliased, problem, warnings };
}

/** β on the original scale (length p, aliased columns 0) from the coefficients of the kept standardised columns. */
export function originalScaleBeta(prep: PreparedFit, betaKept: ArrayLike<number>): Float64Array {
  const p = prep.design.p;
  const b = new Float64Array(p);
  prep.keep.forEach((j, k) => (b[j] = betaKept[k]));
  const out = new Float64Array(p);
  out[0] = b[0];
  for (let j = 1; j < p; j++) {
    if (b[j] === 0) continue;
    out[j] = b[j] / prep.std.scale[j];
    out[0] -= b[j] * prep.std.centerOverScale[j];
  }
  return out;
}

/** Σ weights of a problem: the number of cases (n without weights). */
export function caseTotal(problem: Pick<LogisticProblem, 'n' | 'weights'>): number {
  if (!problem.weights) return problem.n;
  let s = 0;
  for (let i = 0; i < problem.n; i++) s += problem.weights[i];
  return s;
}

/**
 * The events, non-events and coefficients behind a fit (cases, counted with the frequency weights), with the warning
 * when there are few events per coefficient.
 */
export function eventCounts(y: Float64Array, parameters: number, warnings: EngineWarning[], weights?: Float64Array) {
  let events = 0;
  let cases = 0;
  for (let i = 0; i < y.length; i++) {
    const w = weights ? weights[i] : 1;
    events += w * y[i];
    cases += w;
  }
  const nonEvents = cases - events;
  const minority = Math.min(events, nonEvents);
  const eventsPerParameter = minority / Math.max(parameters, 1);
  const which = events <= nonEvents ? 'events' : 'non-events';
  if (minority < parameters) {
    warnings.push(
      warning(
        'few-events',
        `There are ${minority} ${which} for ${parameters} estimated coefficients; the model cannot be estimated ` +
          'reliably.',
        'Use fewer predictors (or fewer categories/knots), or the Firth or ridge method.',
      ),
    );
  } else if (eventsPerParameter < 10) {
    warnings.push(
      warning(
        'low-events-per-parameter',
        `${eventsPerParameter.toFixed(1)} ${which} per estimated coefficient (fewer than the common rule of thumb ` +
          'of 10); estimates may be biased away from zero and the model may be overfitted.',
        "Consider fewer predictors, Firth's method, or a ridge penalty, and validate internally.",
      ),
    );
  }
  return { events, nonEvents, parameters, eventsPerParameter };
}
