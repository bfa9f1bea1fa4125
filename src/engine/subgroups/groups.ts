import { FulcraError, getColumn, type Column, type Dataset } from '../core/data';
import { quantileSorted } from '../numerics/quantile';
import type { SubgroupAssignment, SubgroupGroup, SubgroupSpec } from './types';

/** Default most groups a subgroup column may form (the missing-value group included). */
export const MAX_SUBGROUPS = 50;

const MISSING_RULE =
  'Rows whose subgroup value is missing form a group of their own, "(missing)", listed last; every row used by ' +
  'the model is in exactly one group.';
const BAND_RULE = 'Bands are closed on the left and open on the right: "40 to < 60" holds 40 ≤ value < 60.';

const fmt = (v: number): string => String(v);

/** Throws unless the cut points are finite and strictly increasing, naming the first offending value. */
export function checkCutPoints(column: string, cuts: readonly number[]): void {
  for (let i = 0; i < cuts.length; i++) {
    if (!Number.isFinite(cuts[i]))
      throw new FulcraError(
        'bad-cut-points',
        `The cut points for column "${column}" must be finite numbers; cut point number ${i + 1} is ${cuts[i]}.`,
        'Give numbers such as 40, 60, 80.',
      );
    if (i === 0) continue;
    if (cuts[i] === cuts[i - 1])
      throw new FulcraError(
        'bad-cut-points',
        `The cut point ${fmt(cuts[i])} for column "${column}" is given twice; each cut point must appear once.`,
        `Remove the repeated value: ${[...new Set(cuts)].map(fmt).join(', ')}.`,
      );
    if (cuts[i] < cuts[i - 1])
      throw new FulcraError(
        'bad-cut-points',
        `The cut points for column "${column}" must be in increasing order, but ${fmt(cuts[i])} comes after ` +
          `${fmt(cuts[i - 1])}.`,
        `Give them in increasing order: ${[...cuts]
          .sort((a, b) => a - b)
          .map(fmt)
          .join(', ')}.`,
      );
  }
}

/** Labels and definitions of the bands cut at `cuts` (closed on the left): "< a", "a to < b", …, "≥ z". */
export function bandLabels(column: string, cuts: readonly number[]): { label: string; definition: string }[] {
  const out = [{ label: `< ${fmt(cuts[0])}`, definition: `${column}: value < ${fmt(cuts[0])}` }];
  for (let k = 1; k < cuts.length; k++) {
    const a = fmt(cuts[k - 1]);
    const b = fmt(cuts[k]);
    out.push({ label: `${a} to < ${b}`, definition: `${column}: ${a} ≤ value < ${b}` });
  }
  const last = fmt(cuts[cuts.length - 1]);
  out.push({ label: `≥ ${last}`, definition: `${column}: value ≥ ${last}` });
  return out;
}

/** Band index of a value: the number of cut points ≤ value (binary search). */
function bandOf(cuts: readonly number[], v: number): number {
  let lo = 0;
  let hi = cuts.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (cuts[mid] <= v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function checkRows(data: Dataset, rowsUsed: Int32Array): void {
  for (let i = 0; i < rowsUsed.length; i++) {
    const r = rowsUsed[i];
    if (!(r >= 0 && r < data.nRows))
      throw new FulcraError(
        'bad-rows-used',
        `Used row number ${i + 1} points at data row index ${r}, but the dataset has ${data.nRows} rows.`,
        'Pass the rowsUsed of an analysis of this same dataset.',
      );
  }
}

/** A label for the missing group that no real level already uses. */
function missingLabel(taken: readonly string[]): string {
  let label = '(missing)';
  for (let k = 2; taken.includes(label); k++) label = `(missing ${k})`;
  return label;
}

/**
 * Raw group codes per used row (0..nCandidates−1, or nCandidates for a missing value) and the candidate groups in
 * order, before empty ones are dropped.
 */
function rawGroups(
  col: Column,
  spec: SubgroupSpec,
  rowsUsed: Int32Array,
): { code: Int32Array; candidates: { label: string; definition: string }[]; kind: 'levels' | 'bands' } {
  const n = rowsUsed.length;
  const code = new Int32Array(n);
  const cuts = spec.cutPoints ?? [];
  if (col.kind === 'categorical') {
    if (cuts.length > 0)
      throw new FulcraError(
        'bad-cut-points',
        `Column "${col.name}" holds categories, so it cannot be cut at cut points.`,
        'Leave the cut points empty to use each category as a group, or choose a numeric column.',
      );
    const L = col.levels.length;
    for (let i = 0; i < n; i++) {
      const c = col.codes[rowsUsed[i]];
      code[i] = c >= 0 ? c : L;
    }
    const candidates = col.levels.map((l) => ({ label: l, definition: `${col.name} = "${l}"` }));
    return { code, candidates, kind: 'levels' };
  }
  if (cuts.length > 0) {
    checkCutPoints(col.name, cuts);
    const B = cuts.length + 1;
    for (let i = 0; i < n; i++) {
      const v = col.values[rowsUsed[i]];
      code[i] = Number.isNaN(v) ? B : bandOf(cuts, v);
    }
    return { code, candidates: bandLabels(col.name, cuts), kind: 'bands' };
  }
  const distinct = new Set<number>();
  for (let i = 0; i < n; i++) {
    const v = col.values[rowsUsed[i]];
    if (!Number.isNaN(v)) distinct.add(v);
  }
  const values = [...distinct].sort((a, b) => a - b);
  const index = new Map(values.map((v, k) => [v, k]));
  for (let i = 0; i < n; i++) {
    const v = col.values[rowsUsed[i]];
    code[i] = Number.isNaN(v) ? values.length : index.get(v)!;
  }
  const candidates = values.map((v) => ({ label: fmt(v), definition: `${col.name} = ${fmt(v)}` }));
  return { code, candidates, kind: 'levels' };
}

/**
 * The subgroup of every row the model used (`rowsUsed`: indices into `data`, as an analysis records them), from
 * one column: each level of a categorical column, each distinct value of a numeric column, or the bands of a
 * numeric column cut at `spec.cutPoints` (closed on the left). A missing value is a group of its own, "(missing)",
 * listed last. Groups without used rows are dropped from `groups` and listed in `emptyGroups`.
 * Throws FulcraError for an unknown column, bad cut points, cut points on a categorical column, or more than
 * `spec.maxGroups` (default 50) groups, naming the column and the fix.
 */
export function subgroupsFromColumn(data: Dataset, spec: SubgroupSpec, rowsUsed: Int32Array): SubgroupAssignment {
  const col = getColumn(data, spec.column);
  checkRows(data, rowsUsed);
  const maxGroups = spec.maxGroups ?? MAX_SUBGROUPS;
  if (!(Number.isInteger(maxGroups) && maxGroups >= 1))
    throw new FulcraError('bad-max-groups', `The most groups allowed must be a whole number ≥ 1, got ${maxGroups}.`);
  const { code, candidates, kind } = rawGroups(col, spec, rowsUsed);
  const K = candidates.length;
  const counts = new Int32Array(K + 1);
  for (let i = 0; i < code.length; i++) counts[code[i]]++;
  let used = 0;
  for (let k = 0; k <= K; k++) if (counts[k] > 0) used++;
  if (used > maxGroups) {
    const numeric = col.kind === 'numeric';
    throw new FulcraError(
      'too-many-subgroups',
      `Column "${col.name}" gives ${used} groups among the rows used, more than the ${maxGroups} allowed: ` +
        `subgroup results for so many groups would each rest on a handful of rows.`,
      numeric
        ? `Give cut points for "${col.name}" (e.g. ${suggestCuts(col.values, rowsUsed)}) to group it into bands.`
        : `Choose a column with fewer categories, or merge the categories of "${col.name}" into fewer groups first.`,
    );
  }
  const groups: SubgroupGroup[] = [];
  const emptyGroups: string[] = [];
  const remap = new Int32Array(K + 1).fill(-1);
  for (let k = 0; k < K; k++) {
    if (counts[k] === 0) {
      emptyGroups.push(candidates[k].label);
      continue;
    }
    remap[k] = groups.length;
    groups.push({ ...candidates[k], n: counts[k], missing: false });
  }
  if (counts[K] > 0) {
    remap[K] = groups.length;
    groups.push({
      label: missingLabel(candidates.map((c) => c.label)),
      definition: `${col.name} is missing`,
      n: counts[K],
      missing: true,
    });
  }
  const groupOf = new Int32Array(code.length);
  for (let i = 0; i < code.length; i++) groupOf[i] = remap[code[i]];
  const conventions = kind === 'bands' ? [BAND_RULE, MISSING_RULE] : [MISSING_RULE];
  return {
    column: col.name,
    kind,
    cutPoints: kind === 'bands' ? [...spec.cutPoints!] : null,
    groups,
    groupOf,
    emptyGroups,
    conventions,
  };
}

/** Quartiles of the used values, rounded to 2 significant digits, as an example of cut points for a message. */
function suggestCuts(values: Float64Array, rowsUsed: Int32Array): string {
  const v: number[] = [];
  for (let i = 0; i < rowsUsed.length; i++) if (!Number.isNaN(values[rowsUsed[i]])) v.push(values[rowsUsed[i]]);
  v.sort((a, b) => a - b);
  const q = [0.25, 0.5, 0.75].map((p) => Number(quantileSorted(v, p).toPrecision(2)));
  return [...new Set(q)].map(fmt).join(', ');
}
