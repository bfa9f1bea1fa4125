import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import { countsColumn, type ModelSpec, type OutcomeLayout } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { plural } from '../core/wording';
import { parseDecimal } from './levels';

/**
 * Tables of counts as cases. A row of a grouped table ("12 infections in 340 operations on ward B in March") stands
 * for 12 event cases and 328 non-event cases with the same predictor values. The engine fits it as two weighted rows
 * — outcome 1 with weight 12 and outcome 0 with weight 328 — which gives exactly the likelihood, estimates,
 * standard errors, profile limits, likelihood-ratio tests and weighted evaluation of the table expanded to one row
 * per case, without expanding it. A frequency-weight column multiplies both counts.
 */

/** What a record says about the layout the analysis ran on. */
export interface LayoutRecord {
  kind: OutcomeLayout['kind'];
  /** The yes/no outcome, or the column of event counts. */
  outcome: string;
  /** The column of trials (events-trials) or of non-events (events-nonevents); null for a yes/no outcome. */
  counts: string | null;
  /** The frequency-weight column, or null. */
  weights: string | null;
  /** Rows of the file, and rows whose cases entered the fit (complete, with at least one case). */
  tableRows: number;
  tableRowsUsed: number;
  /** Cases, events and non-events the used rows stand for (the numbers every sample-size rule counts). */
  cases: number;
  events: number;
  nonEvents: number;
  /**
   * Deviances: `perCase` is −2·log-likelihood of the cases (equal to the expanded one-row-per-case data's and to
   * the fit's deviance); `grouped` is relative to the saturated model of the table rows, as R's
   * glm(cbind(events, non-events) ~ …, binomial) reports it, with residual degrees of freedom rows − coefficients.
   * They differ by a constant (the saturated model's −2·log-likelihood) and give the same likelihood-ratio tests.
   * Null for a yes/no outcome (each row is its own saturated model, the two agree).
   */
  deviance: { perCase: number; grouped: number; groupedDf: number; saturated: number } | null;
  /** Said on the page, in the PDF and in the JSON: how the analysis counts cases. */
  convention: string;
}

/** The dataset the engine fits (binary outcome, frequency weights) and how its rows map back to the file. */
export interface CaseRows {
  data: Dataset;
  /** The specification on `data`: a 0/1 outcome and, for grouped tables or weights, a weights column. */
  spec: ModelSpec;
  /** Index in the original dataset of each row of `data`; null when `data` is the original. */
  source: Int32Array | null;
  /** Per original row used: events and trials (each multiplied by its frequency weight); null for yes/no layouts. */
  table: { rows: Int32Array; events: Float64Array; trials: Float64Array } | null;
  layout: Omit<LayoutRecord, 'deviance' | 'cases' | 'events' | 'nonEvents' | 'tableRowsUsed'> & {
    tableRowsUsed: number | null;
  };
  warnings: EngineWarning[];
}

export function layoutOf(spec: ModelSpec): OutcomeLayout {
  return spec.layout ?? { kind: 'binary' };
}

export { countsColumn };

const LAYOUT_WORDS: Record<OutcomeLayout['kind'], string> = {
  binary: 'one yes/no outcome per row',
  'events-trials': 'events and trials per row',
  'events-nonevents': 'events and non-events per row',
};

/** How the record counts cases, in one sentence for the page, the PDF and the JSON. */
export function layoutConvention(layout: OutcomeLayout, weights: string | undefined): string {
  const base = `Outcome layout: ${LAYOUT_WORDS[layout.kind]}${weights ? `, each row weighted by "${weights}"` : ''}.`;
  if (layout.kind === 'binary' && !weights) return base;
  return (
    base +
    ' Every count, test and measure is per case, as if the table were written out one row per case: events per ' +
    'parameter, AUC, calibration, Brier score, cut-off tables and net benefit count cases, and the bootstrap ' +
    'resamples cases, not rows of the table.'
  );
}

function countGetter(col: Column): (r: number) => number {
  if (col.kind === 'numeric') return (r) => col.values[r];
  const parsed = col.levels.map(parseDecimal);
  return (r) => (col.codes[r] < 0 ? NaN : parsed[col.codes[r]]);
}

function isMissingCell(col: Column, r: number): boolean {
  return col.kind === 'numeric' ? Number.isNaN(col.values[r]) : col.codes[r] < 0;
}

/** A name for the engine's weights column that no column of the case rows (outcome, predictors) has. */
function freshName(taken: string[], base: string): string {
  const names = new Set(taken);
  let name = base;
  for (let k = 2; names.has(name); k++) name = `${base} ${k}`;
  return name;
}

function countError(data: Dataset, r: number, column: string, value: number, what: string, fix: string): FulcraError {
  const shown = Number.isNaN(value) ? 'not a number' : String(value);
  return new FulcraError('bad-count', `Row ${sheetRow(data, r)}: "${column}" is ${shown}; ${what}.`, fix);
}

/**
 * The rows the engine fits for a specification: the data unchanged for a yes/no outcome (weights, if any, are read by
 * the design), or, for a grouped table, two weighted rows per table row (events with outcome 1, non-events with
 * outcome 0; a part with no cases is left out). Table rows with a missing count, weight or predictor are left out
 * and counted per column, rows with no cases are left out and named; every count is checked row by row (whole,
 * not negative, events ≤ trials, weights whole and ≥ 1) and the first failure throws naming the row and the column.
 */
export function caseRows(data: Dataset, spec: ModelSpec): CaseRows {
  const layout = layoutOf(spec);
  const counts = countsColumn(layout);
  const weights = spec.weights ?? null;
  const convention = layoutConvention(layout, spec.weights);
  const base = { kind: layout.kind, outcome: spec.outcome, counts, weights, tableRows: data.nRows, convention };
  if (layout.kind === 'binary') {
    const { layout: _l, ...binary } = spec;
    return { data, spec: binary, source: null, table: null, layout: { ...base, tableRowsUsed: null }, warnings: [] };
  }
  const named = [spec.outcome, counts!, ...(weights ? [weights] : [])];
  for (const c of named) getColumn(data, c);
  if (new Set(named).size < named.length)
    throw new FulcraError(
      'layout-columns-repeat',
      `The outcome layout uses one column twice (${named.map((c) => `"${c}"`).join(', ')}).`,
      'Choose different columns for the events, the trials or non-events, and the weights.',
    );
  const predictors = new Set<string>();
  for (const t of spec.terms) for (const c of t.type === 'interaction' ? t.columns : [t.column]) predictors.add(c);
  for (const c of named)
    if (predictors.has(c))
      throw new FulcraError(
        'count-as-predictor',
        `The column "${c}" is part of the outcome layout and cannot also be a predictor.`,
        'Remove it from the predictors (to model the rate per trial, the layout already allows for the trials).',
      );
  const evCol = getColumn(data, spec.outcome);
  const nCol = getColumn(data, counts!);
  const wCol = weights ? getColumn(data, weights) : null;
  const predCols = [...predictors].map((c) => getColumn(data, c));
  const checked = [evCol, nCol, ...(wCol ? [wCol] : []), ...predCols];
  const getE = countGetter(evCol);
  const getN = countGetter(nCol);
  const getW = wCol ? countGetter(wCol) : () => 1;
  const droppedByColumn: Record<string, number> = {};
  const rows: number[] = [];
  const zeroRows: number[] = [];
  const ev: number[] = [];
  const tr: number[] = [];
  const whole = (v: number) => Number.isInteger(v) && v >= 0;
  for (let r = 0; r < data.nRows; r++) {
    let missing = false;
    for (const c of checked)
      if (isMissingCell(c, r)) {
        droppedByColumn[c.name] = (droppedByColumn[c.name] ?? 0) + 1;
        missing = true;
      }
    if (missing) continue;
    const e = getE(r);
    const m = getN(r);
    const w = getW(r);
    if (!whole(e))
      throw countError(
        data,
        r,
        spec.outcome,
        e,
        'a count of events must be a whole number of 0 or more',
        'Correct the count in that row (a rate or a percentage must be turned back into a count).',
      );
    if (!whole(m))
      throw countError(
        data,
        r,
        counts!,
        m,
        `a count of ${layout.kind === 'events-trials' ? 'trials' : 'non-events'} must be a whole number of 0 or more`,
        'Correct the count in that row.',
      );
    if (layout.kind === 'events-trials' && e > m)
      throw new FulcraError(
        'events-exceed-trials',
        `Row ${sheetRow(data, r)}: ${e} events in "${spec.outcome}" but only ${m} trials in "${counts}"; the ` +
          'events cannot outnumber the trials.',
        `Correct the row, or if "${counts}" counts non-events, choose the layout "events and non-events" ` +
          '(--nonevents in npm run fit).',
      );
    if (wCol && !(Number.isInteger(w) && w >= 1))
      throw countError(
        data,
        r,
        weights!,
        w,
        'a frequency weight counts identical rows, so it must be a whole number of at least 1',
        'Correct the weight in that row, or leave the row out of the file.',
      );
    const trials = layout.kind === 'events-trials' ? m : e + m;
    if (trials === 0) {
      zeroRows.push(sheetRow(data, r));
      continue;
    }
    rows.push(r);
    ev.push(e * w);
    tr.push(trials * w);
  }
  const warnings: EngineWarning[] = [];
  if (zeroRows.length > 0)
    warnings.push(
      warning(
        'rows-without-cases',
        `${plural(zeroRows.length, 'row')} of the table ${zeroRows.length === 1 ? 'has' : 'have'} no cases ` +
          `(0 ${layout.kind === 'events-trials' ? 'trials' : 'events and 0 non-events'}) and add nothing to the ` +
          `fit: row${zeroRows.length === 1 ? '' : 's'} ${zeroRows.slice(0, 20).join(', ')}` +
          `${zeroRows.length > 20 ? ', …' : ''}.`,
        'Nothing to do if those rows are empty cells of the table; check them if cases were expected.',
      ),
    );
  const dropped = Object.values(droppedByColumn).length > 0;
  if (dropped) {
    const total = data.nRows - rows.length - zeroRows.length;
    const per = Object.entries(droppedByColumn)
      .map(([c, k]) => `"${c}" ${k}`)
      .join(', ');
    warnings.push(
      warning(
        'rows-dropped',
        `${total} of ${plural(data.nRows, 'table row')} ${total === 1 ? 'was' : 'were'} left out because of missing ` +
          `values (missing per column: ${per}).`,
        'Fill in the missing counts or predictor values if the rows hold cases.',
      ),
    );
  }
  const parts = ev.reduce((a, e, k) => a + (e > 0 ? 1 : 0) + (tr[k] - e > 0 ? 1 : 0), 0);
  const source = new Int32Array(parts);
  const y = new Float64Array(parts);
  const w = new Float64Array(parts);
  let k = 0;
  rows.forEach((r, i) => {
    if (ev[i] > 0) {
      source[k] = r;
      y[k] = 1;
      w[k++] = ev[i];
    }
    if (tr[i] - ev[i] > 0) {
      source[k] = r;
      y[k] = 0;
      w[k++] = tr[i] - ev[i];
    }
  });
  const weightName = freshName([spec.outcome, ...predictors], 'cases');
  const columns: Column[] = [
    { kind: 'numeric', name: spec.outcome, values: y },
    { kind: 'numeric', name: weightName, values: w },
    ...predCols.map((c): Column => pick(c, source)),
  ];
  const rowNumbers = Int32Array.from(source, (r) => sheetRow(data, r));
  const split: Dataset = { nRows: parts, columns, rowNumbers };
  const fitted: ModelSpec = { outcome: spec.outcome, event: '1', terms: spec.terms, weights: weightName };
  return {
    data: split,
    spec: fitted,
    source,
    table: { rows: Int32Array.from(rows), events: Float64Array.from(ev), trials: Float64Array.from(tr) },
    layout: { ...base, tableRowsUsed: rows.length },
    warnings,
  };
}

function pick(c: Column, rows: Int32Array): Column {
  if (c.kind === 'numeric')
    return { kind: 'numeric', name: c.name, values: Float64Array.from(rows, (r) => c.values[r]) };
  return { kind: 'categorical', name: c.name, levels: c.levels, codes: Int32Array.from(rows, (r) => c.codes[r]) };
}

/** Σ over table rows of −2·[e·log(e/m) + (m−e)·log((m−e)/m)]: the saturated grouped model's −2·log-likelihood. */
export function saturatedDeviance(events: Float64Array, trials: Float64Array): number {
  let s = 0;
  const t = (k: number, q: number) => (k > 0 ? k * Math.log(q) : 0);
  for (let i = 0; i < events.length; i++) {
    const e = events[i],
      m = trials[i];
    s += t(e, e / m) + t(m - e, (m - e) / m);
  }
  return -2 * s;
}
