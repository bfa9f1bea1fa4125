/**
 * The subgroup table as CSV (RFC 4180, CRLF), one line per group and a last line for all rows: n, events, O/E,
 * AUC, calibration-in-the-large and slope each with its interval in columns of their own, and the cut-off counts
 * and proportions. Text cells are neutralised against spreadsheet formula injection (OWASP) and quoted; numbers are
 * written with round-trip precision; a value that was not computed is an empty cell.
 */
import type { SubgroupPerformance, SubgroupRow } from '../../engine/subgroups';
import { neutraliseCell, quoteField } from './predictionsCsv';

const NL = '\r\n';
const cell = (s: string): string => quoteField(neutraliseCell(s), ',');
const num = (v: number | null | undefined): string =>
  v === null || v === undefined || !Number.isFinite(v) ? '' : String(v);
const trio = (e: { estimate: number | null; lower: number | null; upper: number | null } | null): string[] =>
  e ? [num(e.estimate), num(e.lower), num(e.upper)] : ['', '', ''];

/** The table of a SubgroupPerformance record as CSV text. */
export function subgroupsCsv(perf: SubgroupPerformance): string {
  const lvl = `${+(100 * perf.level).toPrecision(6)}%`;
  const withCi = (name: string) => [name, `${name} lower ${lvl}`, `${name} upper ${lvl}`];
  const header = [
    'column',
    'group',
    'definition',
    'n',
    'events',
    'expected events',
    ...withCi('O/E'),
    ...withCi('AUC'),
    ...withCi('calibration-in-the-large'),
    ...withCi('calibration slope'),
    'cut-off',
    'true positives',
    'false positives',
    'false negatives',
    'true negatives',
    ...withCi('sensitivity'),
    ...withCi('specificity'),
    ...withCi('fraction flagged'),
    'too-small rule',
    'not computed because',
  ];
  const line = (r: SubgroupRow): string => {
    const c = r.atCutoff;
    return [
      cell(perf.column),
      cell(r.label),
      cell(r.definition),
      num(r.n),
      num(r.events),
      num(r.expected),
      ...trio(r.observedExpected),
      ...trio(r.auc),
      ...trio(r.calibrationInTheLarge),
      ...trio(r.calibrationSlope),
      num(c?.threshold),
      num(c?.tp),
      num(c?.fp),
      num(c?.fn),
      num(c?.tn),
      ...trio(c?.sensitivity ?? null),
      ...trio(c?.specificity ?? null),
      ...trio(c?.fractionFlagged ?? null),
      cell(r.precision),
      cell(r.notComputed ?? ''),
    ].join(',');
  };
  return [header.map(cell).join(','), ...[...perf.rows, perf.overall].map(line)].join(NL) + NL;
}
