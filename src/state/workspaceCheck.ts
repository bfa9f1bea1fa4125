/**
 * The one check of a saved workspace before anything of it is used: the same for a workspace file and for the work
 * kept in this browser. It refuses a bad record with FulcraError 'workspace-file-invalid' naming the field (e.g.
 * `"workspace.extra.workbench.level" must be a number between 0.5 and 1`), before the worker or the store change.
 *
 * The page's own settings (`extra.workbench`) are checked field by field against `workbenchChecks`, one row per
 * field of WorkbenchSettings (TypeScript refuses a new field without its row). A field that is absent takes its
 * default (workspaces saved before the field existed); a field that is present must be valid. The data summary
 * (`extra.summary`) must describe the data it came with, column for column.
 */
import { countsColumn, type Dataset, type FitMethod } from '../engine/core';
import { analysisRequestTable, resolveRequest } from '../engine/workflow';
import { FieldChecker } from '../io/export/validate';
import { checkLayout, checkSpec, type Workspace } from '../io/export/workspaceFile';
import type { ColumnType } from '../io/types';
import type { DataSummary, FitRequest } from '../worker/protocol';
import type { WorkbenchSettings } from './workspace';

const CODE = 'workspace-file-invalid';
const METHODS: readonly FitMethod[] = ['ml', 'firth', 'ridge', 'lasso', 'elastic-net'];
const VIEWS = [
  'data',
  'model',
  'models',
  'influence',
  'shape',
  'performance',
  'subgroups',
  'cutoff',
  'score',
  'points',
  'monitor',
] as const;
// Every view the page has must be restorable: a view missing here would make a saved workspace unreadable.
type MissingView = Exclude<import('./appState').ViewId, (typeof VIEWS)[number]>;
const everyView: MissingView extends never ? true : never = true;
void everyView;
const COLUMN_TYPES: readonly ColumnType[] = ['numeric', 'binary', 'categorical', 'date', 'identifier', 'text', 'empty'];

/** One row of the table: checks a present value at `path` and returns it as the page keeps it. */
type Check<T> = (c: FieldChecker, v: unknown, path: string) => T;

const nullable =
  <T>(check: Check<T>): Check<T | null> =>
  (c, v, path) =>
    v === null ? null : check(c, v, path);
const record =
  <T>(check: Check<T>): Check<Record<string, T>> =>
  (c, v, path) =>
    Object.fromEntries(Object.entries(c.object(v, path)).map(([k, x]) => [k, check(c, x, `${path}.${k}`)]));
const between =
  (lo: number, hi: number, open: boolean, what: string): Check<number> =>
  (c, v, path) => {
    const n = c.finite(v, path);
    if (open ? n <= lo || n >= hi : n < lo || n > hi) c.fail(path, `must be ${what}`);
    return n;
  };
const wholeBetween =
  (lo: number, hi: number): Check<number> =>
  (c, v, path) => {
    const n = c.finite(v, path);
    if (!Number.isInteger(n) || n < lo || n > hi) c.fail(path, `must be a whole number from ${lo} to ${hi}`);
    return n;
  };
const oneOf =
  <T extends string>(options: readonly T[]): Check<T> =>
  (c, v, path) =>
    c.oneOf(v, options, path);
const text: Check<string> = (c, v, path) => c.string(v, path);
const flag: Check<boolean> = (c, v, path) => c.boolean(v, path);
const positive = between(0, Infinity, true, 'a number above 0');

const role: Check<WorkbenchSettings['roles'][string]> = (c, v, path) => {
  const r = c.object(v, path);
  const knots = c.number(r.knots, `${path}.knots`);
  if (knots !== 0 && knots !== 3 && knots !== 4 && knots !== 5) c.fail(`${path}.knots`, 'must be 0, 3, 4 or 5');
  return {
    include: c.boolean(r.include, `${path}.include`),
    reference: r.reference === null ? null : c.string(r.reference, `${path}.reference`),
    knots: knots as 0 | 3 | 4 | 5,
  };
};

const costs: Check<WorkbenchSettings['costs']> = (c, v, path) => {
  const o = c.object(v, path);
  return {
    missedCase: positive(c, o.missedCase, `${path}.missedCase`),
    falseAlarm: positive(c, o.falseAlarm, `${path}.falseAlarm`),
  };
};

const importSettings: Check<WorkbenchSettings['importSettings']> = (c, v, path) => {
  const o = c.object(v, path);
  return {
    delimiter: c.oneOf(o.delimiter, ['auto', ',', ';', '\t', '|'] as const, `${path}.delimiter`),
    decimal: c.oneOf(o.decimal, ['auto', '.', ','] as const, `${path}.decimal`),
    encoding: c.oneOf(o.encoding, ['auto', 'utf-8', 'windows-1252'] as const, `${path}.encoding`),
    header: c.oneOf(o.header, ['auto', 'yes', 'no'] as const, `${path}.header`),
    sheet: o.sheet === null || o.sheet === undefined ? null : c.string(o.sheet, `${path}.sheet`),
    columnTypes:
      o.columnTypes === undefined ? {} : record(oneOf(COLUMN_TYPES))(c, o.columnTypes, `${path}.columnTypes`),
  };
};

const reportText: Check<WorkbenchSettings['reportText']> = (c, v, path) => {
  const o = c.object(v, path);
  const out: WorkbenchSettings['reportText'] = {};
  for (const k of ['purpose', 'setting', 'population', 'notes'] as const)
    if (o[k] !== undefined) out[k] = c.string(o[k], `${path}.${k}`);
  if (o.cautions !== undefined)
    out.cautions = c.oneOf(o.cautions, ['clinical', 'quality'] as const, `${path}.cautions`);
  return out;
};

/** The request the shown result was fitted for: the engine's own request table decides what is valid. */
const fittedRequest: Check<FitRequest> = (c, v, path) => {
  const o = c.object(v, path);
  const spec = checkSpec(c, o.spec, `${path}.spec`);
  const table = analysisRequestTable as Record<string, { valid(v: unknown): boolean; expected: string }>;
  for (const [key, value] of Object.entries(o)) {
    if (!(key in table)) c.fail(`${path}.${key}`, 'is not an analysis option');
    if (key !== 'spec' && value !== undefined && !table[key].valid(value))
      c.fail(`${path}.${key}`, `must be ${table[key].expected}`);
  }
  try {
    resolveRequest({ ...o, spec } as FitRequest);
  } catch (e) {
    c.fail(path, `is not a request the engine accepts (${(e as Error).message})`);
  }
  return { ...(o as unknown as FitRequest), spec };
};

/**
 * Every field of WorkbenchSettings and how a saved value is checked. To keep a new setting in workspaces: add it to
 * WorkbenchSettings and `settingsOf` (workspace.ts) and give it a row here; an absent value takes the default.
 */
export const workbenchChecks: { [K in keyof WorkbenchSettings]-?: Check<NonNullable<WorkbenchSettings[K]> | null> } = {
  outcome: nullable(text),
  event: nullable(text),
  layout: (c, v, path) => checkLayout(c, v, path),
  weights: nullable(text),
  roles: record(role),
  interactions: (c, v, path) =>
    c.array(v, path).map((x, i) => {
      const pair = c.stringArray(x, `${path}[${i}]`);
      if (pair.length !== 2) c.fail(`${path}[${i}]`, 'must name exactly two columns');
      return [pair[0], pair[1]] as [string, string];
    }),
  method: (c, v, path) => c.oneOf(v === 'elasticnet' ? 'elastic-net' : v, METHODS, path),
  alpha: between(0, 1, false, 'a number from 0 to 1'),
  lambdaRule: oneOf(['min', '1se'] as const),
  level: between(0.5, 1, true, 'a number between 0.5 and 1 (e.g. 0.95)'),
  maxIter: wholeBetween(1, 10_000),
  threshold: between(0, 1, true, 'a number between 0 and 1'),
  costs,
  reportText,
  oddsUnits: record(positive),
  importSettings,
  view: oneOf(VIEWS),
  cutoffHow: oneOf(['cost-based', 'cheapest', 'hand', 'restored'] as const),
  costsSetByUser: flag,
  fitted: flag,
  fittedRequest: nullable(fittedRequest),
  keptModels: (c, v, path) =>
    c.array(v, path).map((x, i) => {
      const o = c.object(x, `${path}[${i}]`);
      return {
        name: c.string(o.name, `${path}[${i}].name`),
        named: c.boolean(o.named, `${path}[${i}].named`),
        request: fittedRequest(c, o.request, `${path}[${i}].request`),
      };
    }),
};

/** The saved page settings, checked; absent fields are left out (the caller fills its defaults). */
export function checkWorkbench(c: FieldChecker, v: unknown, path: string): Partial<WorkbenchSettings> {
  const w = c.object(v, path);
  for (const required of ['roles', 'interactions', 'costs'] as const)
    if (w[required] === undefined) c.fail(`${path}.${required}`, 'is missing');
  const out: Record<string, unknown> = {};
  for (const [key, check] of Object.entries(workbenchChecks) as [string, Check<unknown>][])
    if (w[key] !== undefined) out[key] = check(c, w[key], `${path}.${key}`);
  return out as Partial<WorkbenchSettings>;
}

const count: Check<number> = wholeBetween(0, Number.MAX_SAFE_INTEGER);
const numberOrNull: Check<number | null> = (c, v, path) => (v === null ? null : c.number(v, path));

/** The saved data summary: every field the page reads, and the same columns and rows as the data. */
export function checkSummary(c: FieldChecker, v: unknown, path: string, data: Dataset | null): DataSummary {
  const s = c.object(v, path);
  const source = c.object(s.source, `${path}.source`);
  c.oneOf(source.kind, ['demo', 'file', 'paste'] as const, `${path}.source.kind`);
  c.string(source.name, `${path}.source.name`);
  if (source.notice !== null && source.notice !== undefined) c.string(source.notice, `${path}.source.notice`);
  const nRows = count(c, s.nRows, `${path}.nRows`);
  const columns = c.array(s.columns, `${path}.columns`);
  columns.forEach((x, i) => {
    const p = `${path}.columns[${i}]`;
    const col = c.object(x, p);
    c.string(col.name, `${p}.name`);
    c.oneOf(col.kind, ['numeric', 'categorical'] as const, `${p}.kind`);
    c.oneOf(col.type, COLUMN_TYPES, `${p}.type`);
    c.string(col.reason, `${p}.reason`);
    c.boolean(col.modelling, `${p}.modelling`);
    c.stringArray(col.levels, `${p}.levels`);
    count(c, col.missing, `${p}.missing`);
    count(c, col.distinct, `${p}.distinct`);
    for (const k of ['min', 'median', 'max'] as const) numberOrNull(c, col[k], `${p}.${k}`);
    c.array(col.bins, `${p}.bins`).forEach((b, j) => {
      const bin = c.object(b, `${p}.bins[${j}]`);
      c.string(bin.label, `${p}.bins[${j}].label`);
      c.number(bin.count, `${p}.bins[${j}].count`);
    });
    if (col.proposedEvent !== null && col.proposedEvent !== undefined)
      c.string(col.proposedEvent, `${p}.proposedEvent`);
  });
  c.array(s.warnings, `${path}.warnings`).forEach((x, i) => {
    const w = c.object(x, `${path}.warnings[${i}]`);
    c.string(w.code, `${path}.warnings[${i}].code`);
    c.string(w.message, `${path}.warnings[${i}].message`);
  });
  if (s.suggestedSpec !== null && s.suggestedSpec !== undefined) checkSpec(c, s.suggestedSpec, `${path}.suggestedSpec`);
  if (s.truth !== null && s.truth !== undefined) c.array(s.truth, `${path}.truth`);
  if (s.format !== null && s.format !== undefined) c.object(s.format, `${path}.format`);
  if (s.firstRow !== undefined) wholeBetween(1, Number.MAX_SAFE_INTEGER)(c, s.firstRow, `${path}.firstRow`);
  if (data) {
    if (nRows !== data.nRows) c.fail(`${path}.nRows`, `is ${nRows}, but the data hold ${data.nRows} rows`);
    if (columns.length !== data.columns.length)
      c.fail(`${path}.columns`, `lists ${columns.length} columns, but the data hold ${data.columns.length}`);
    data.columns.forEach((d, i) => {
      const col = columns[i] as Record<string, unknown>;
      if (col.name !== d.name || col.kind !== d.kind)
        c.fail(
          `${path}.columns[${i}]`,
          `describes "${String(col.name)}", but the data's column ${i + 1} is "${d.name}"`,
        );
    });
  }
  return s as unknown as DataSummary;
}

/** What a checked workspace gives the page. */
export interface CheckedWorkspace {
  /** The saved page settings (absent fields left out), or null when another tool wrote the workspace. */
  workbench: Partial<WorkbenchSettings> | null;
  summary: DataSummary | null;
  dataId: string | null;
}

/**
 * Checks a workspace (already read by readWorkspaceFile or loadWorkspaceFromBrowser, which check the file's own
 * fields and the data) for everything the page will use. Throws FulcraError 'workspace-file-invalid' naming the
 * field; `kind` words the message ("workspace file" or "work kept in this browser").
 */
export function checkWorkspace(ws: Workspace, kind = 'workspace file'): CheckedWorkspace {
  const c = new FieldChecker(CODE, kind);
  const fo = ws.fitOptions ?? {};
  if (fo.level !== undefined)
    between(0.5, 1, true, 'a number between 0.5 and 1')(c, fo.level, 'workspace.fitOptions.level');
  if (fo.maxIter !== undefined) wholeBetween(1, 10_000)(c, fo.maxIter, 'workspace.fitOptions.maxIter');
  if (ws.threshold !== null) between(0, 1, true, 'a number between 0 and 1')(c, ws.threshold, 'workspace.threshold');
  if (ws.costs) costs(c, ws.costs, 'workspace.costs');
  const extra = ws.extra ?? {};
  const workbench =
    extra.workbench === undefined || extra.workbench === null
      ? null
      : checkWorkbench(c, extra.workbench, 'workspace.extra.workbench');
  const summary =
    extra.summary === undefined || extra.summary === null
      ? null
      : checkSummary(c, extra.summary, 'workspace.extra.summary', ws.data);
  const fitted = workbench?.fittedRequest;
  if (fitted && ws.data) {
    const names = new Set(ws.data.columns.map((col) => col.name));
    const used = [
      fitted.spec.outcome,
      ...fitted.spec.terms.flatMap((t) => ('columns' in t ? t.columns : [t.column])),
      ...[countsColumn(fitted.spec.layout), fitted.spec.weights ?? null].filter((x): x is string => x !== null),
    ];
    const missing = used.find((n) => !names.has(n));
    if (missing !== undefined)
      c.fail(
        'workspace.extra.workbench.fittedRequest.spec',
        `names the column "${missing}", which the data do not have`,
      );
  }
  const dataId =
    extra.dataId === undefined || extra.dataId === null ? null : c.string(extra.dataId, 'workspace.extra.dataId');
  return { workbench, summary, dataId };
}
