/**
 * The two tables of a monitoring record as CSV (RFC 4180, CRLF): the unit table of the funnel plot and the list of
 * CUSUM signals. Text cells (unit names, headers) are neutralised against spreadsheet formula injection (OWASP)
 * and quoted; numbers are written with round-trip precision; a value that does not exist is an empty cell.
 */
import type { FunnelLimits, MonitoringRecord } from '../../engine/monitoring';
import { overallSignals, unitSignals, type SignalLine } from '../../engine/core';
import { neutraliseCell, quoteField } from './predictionsCsv';

const NL = '\r\n';
const cell = (s: string): string => quoteField(neutraliseCell(s), ',');
const num = (v: number | null | undefined): string =>
  v === null || v === undefined || !Number.isFinite(v) ? '' : String(v);
const pct = (level: number): string => `${+(100 * level).toPrecision(6)}%`;

function lines(header: string[], rows: string[][]): string {
  return [header.map(cell).join(','), ...rows.map((r) => r.join(','))].join(NL) + NL;
}

const limitCells = (l: FunnelLimits | null): string[] =>
  l ? [num(l.inner.lower), num(l.inner.upper), num(l.outer.lower), num(l.outer.upper)] : ['', '', '', ''];

/**
 * One line per unit: cases, O, E, O/E with its exact interval, O − E, the funnel limits at the unit's E and where
 * the unit sits (with the overdispersion-adjusted limits and flag when they were asked for). Null without units.
 */
export function monitoringUnitsCsv(record: MonitoringRecord): string | null {
  const f = record.funnel;
  if (!f) return null;
  const [inner, outer] = f.levels.map(pct);
  const lvl = pct(record.options.level);
  const adjusted = f.overdispersion !== null;
  const header = [
    'unit',
    'cases',
    'observed',
    'expected',
    'O/E',
    `O/E lower ${lvl}`,
    `O/E upper ${lvl}`,
    'O - E',
    `limit lower ${inner}`,
    `limit upper ${inner}`,
    `limit lower ${outer}`,
    `limit upper ${outer}`,
    'position',
    ...(adjusted
      ? [
          `adjusted lower ${inner}`,
          `adjusted upper ${inner}`,
          `adjusted lower ${outer}`,
          `adjusted upper ${outer}`,
          'adjusted position',
        ]
      : []),
  ];
  const rows = f.units.map((u) => [
    cell(u.unit),
    num(u.n),
    num(u.observed),
    num(u.expected),
    num(u.oe.estimate),
    num(u.oe.lower),
    num(u.oe.upper),
    num(u.oMinusE),
    ...limitCells(u.limits),
    cell(u.flag),
    ...(adjusted ? [...limitCells(u.adjustedLimits), cell(u.adjustedFlag ?? '')] : []),
  ]);
  return lines(header, rows);
}

/**
 * Every CUSUM signal of both charts, first those over all cases (case order), then those of each unit's own chart
 * (date order): chart, cases the chart ran on ("all cases" or the unit), odds ratio, h, case (within the unit for a
 * unit's chart), date, unit of that case, spreadsheet row, chart value.
 */
export function monitoringSignalsCsv(record: MonitoringRecord): string {
  const oddsOf = (chart: SignalLine['chart']) =>
    chart === 'deterioration' ? record.cusum.deteriorate : record.cusum.improve;
  const header = ['chart', 'run on', 'odds ratio', 'limit h', 'case', 'date', 'unit', 'spreadsheet row', 'chart value'];
  const rows = [...overallSignals(record), ...unitSignals(record)].map(({ chart, unit, s }) => {
    const c = oddsOf(chart);
    return [
      cell(chart),
      unit === null ? 'all cases' : cell(unit),
      num(c.oddsRatio),
      num(c.h),
      num(s.case),
      cell(s.dateLabel),
      s.unit === null ? '' : cell(s.unit),
      num(s.row),
      num(s.value),
    ];
  });
  return lines(header, rows);
}
