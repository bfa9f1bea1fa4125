import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import { countsColumn, type OutcomeLayout } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import type { UnitCodes } from './score';

/** A monitoring file of counts is written out to at most this many cases. */
export const MAX_WRITTEN_CASES = 5_000_000;

/**
 * A monitoring file laid out as a table of counts (events with trials or non-events per row — e.g. ward-months)
 * written out one row per case, so that observed and expected events (trials × risk), the funnel plot, calibration
 * and the case-by-case CUSUMs count cases. Each case keeps its row's date, unit, predictors and spreadsheet row.
 * Within a row the order of events and non-events is not known: the events are spread evenly among the row's cases
 * (case k of m is an event when ⌊(k+1)·e/m⌋ > ⌊k·e/m⌋), which the record's warning states. Rows with a missing count
 * stay one row with a missing outcome (listed as unscored); rows with no cases are left out and counted; a count
 * that is not a whole number ≥ 0, or events above trials, throws naming the row and the column.
 */
export function writeOutCounts(
  data: Dataset,
  outcome: string,
  layout: Exclude<OutcomeLayout, { kind: 'binary' }>,
  dates: Float64Array,
  units: UnitCodes | null,
): { data: Dataset; dates: Float64Array; units: UnitCodes | null; warnings: EngineWarning[] } {
  const counts = countsColumn(layout)!;
  const ev = getColumn(data, outcome);
  const tr = getColumn(data, counts);
  const num = (c: Column, r: number) =>
    c.kind === 'numeric' ? c.values[r] : c.codes[r] < 0 ? NaN : Number(c.levels[c.codes[r]]);
  const perRow = new Int32Array(data.nRows);
  const events = new Float64Array(data.nRows);
  let total = 0;
  let empty = 0;
  for (let r = 0; r < data.nRows; r++) {
    const e = num(ev, r);
    const m = num(tr, r);
    if (Number.isNaN(e) || Number.isNaN(m)) {
      perRow[r] = 1; // kept as one unscored row (missing outcome)
      events[r] = NaN;
      total++;
      continue;
    }
    for (const [v, name] of [
      [e, outcome],
      [m, counts],
    ] as const)
      if (!(Number.isInteger(v) && v >= 0))
        throw new FulcraError(
          'bad-count',
          `Row ${sheetRow(data, r)}: "${name}" is ${v}; a count must be a whole number of 0 or more.`,
          'Correct the count in that row of the monitoring file.',
        );
    const cases = layout.kind === 'events-trials' ? m : e + m;
    if (e > cases)
      throw new FulcraError(
        'events-exceed-trials',
        `Row ${sheetRow(data, r)}: ${e} events in "${outcome}" but only ${m} trials in "${counts}".`,
        'Correct the row of the monitoring file.',
      );
    if (cases === 0) empty++;
    perRow[r] = cases;
    events[r] = e;
    total += cases;
  }
  if (total > MAX_WRITTEN_CASES)
    throw new FulcraError(
      'too-many-cases',
      `The monitoring table stands for ${total.toLocaleString('en')} cases; monitoring writes them out one per ` +
        `case and takes at most ${MAX_WRITTEN_CASES.toLocaleString('en')}.`,
      'Monitor a shorter period or fewer units at a time.',
    );
  const source = new Int32Array(total);
  const y = new Float64Array(total);
  let k = 0;
  for (let r = 0; r < data.nRows; r++) {
    const m = perRow[r];
    const e = events[r];
    for (let c = 0; c < m; c++, k++) {
      source[k] = r;
      y[k] = Number.isNaN(e) ? NaN : Math.floor(((c + 1) * e) / m) > Math.floor((c * e) / m) ? 1 : 0;
    }
  }
  const columns: Column[] = data.columns
    .filter((c) => c.name !== outcome && c.name !== counts)
    .map((c) =>
      c.kind === 'numeric'
        ? { kind: 'numeric', name: c.name, values: Float64Array.from(source, (r) => c.values[r]) }
        : { kind: 'categorical', name: c.name, levels: c.levels, codes: Int32Array.from(source, (r) => c.codes[r]) },
    );
  columns.push({ kind: 'numeric', name: outcome, values: y });
  const written: Dataset = { nRows: total, columns, rowNumbers: Int32Array.from(source, (r) => sheetRow(data, r)) };
  const warnings: EngineWarning[] = [
    warning(
      'monitoring-counts-written-out',
      `The monitoring file is a table of counts: its ${data.nRows.toLocaleString('en')} rows were written out as ` +
        `${total.toLocaleString('en')} cases (expected events are trials × risk). Within a row the order of events ` +
        'and non-events is not known, so the CUSUMs spread each row’s events evenly among its cases.' +
        (empty > 0 ? ` ${empty} ${empty === 1 ? 'row has' : 'rows have'} no cases and add nothing.` : ''),
      'Read the CUSUM signal dates to the resolution of the table (a month, for ward-months).',
    ),
  ];
  return {
    data: written,
    dates: Float64Array.from(source, (r) => dates[r]),
    units: units ? { levels: units.levels, codes: Int32Array.from(source, (r) => units.codes[r]) } : null,
    warnings,
  };
}
