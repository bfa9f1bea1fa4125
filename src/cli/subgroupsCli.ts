import { FulcraError } from '../engine/core';
import type { SubgroupPerformance } from '../engine/subgroups';
import { subgroupTableText } from '../report/subgroupTable';
import type { FitArgs } from './args';
import { table } from './format';

/** `--subgroup-cuts 40,60,80`: the numbers, or a message naming the value that is not one. */
export function parseSubgroupCuts(v: string): number[] {
  const tokens = v
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  const bad = tokens.find((t) => !Number.isFinite(Number(t)));
  if (tokens.length === 0 || bad !== undefined)
    throw new FulcraError(
      'bad-argument',
      `--subgroup-cuts needs numbers separated by commas, e.g. --subgroup-cuts 40,60,80` +
        (bad !== undefined ? `; "${bad}" is not a number.` : '.'),
    );
  return tokens.map(Number);
}

/** `--subgroup-cuts` goes with `--subgroups COL` (checked before any fitting). */
export function checkSubgroupArgs(a: FitArgs): void {
  if (a.subgroups === undefined && a.subgroupCuts !== undefined)
    throw new FulcraError('bad-argument', '--subgroup-cuts goes with --subgroups COL (the column to cut).');
}

/** Readable lines of the subgroup record for the summary: the table, the rule and its sources. */
export function subgroupLines(perf: SubgroupPerformance): string[] {
  const { header, rows } = subgroupTableText(perf);
  const cut = perf.threshold === null ? ' (no cut-off: give --threshold P for sensitivity and specificity)' : '';
  return [
    `Performance by subgroup of "${perf.column}" (${perf.rows.length} groups, ${perf.overall.n} rows used)${cut}`,
    ...table(header, rows)
      .split('\n')
      .map((l) => `  ${l}`),
    ...perf.conventions.map((c) => `  ${c}`),
    ...(perf.emptyGroups.length ? [`  Groups with none of the rows used: ${perf.emptyGroups.join(', ')}.`] : []),
    `  Too-small rule: ${perf.rule.text}`,
  ];
}
