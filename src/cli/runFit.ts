import { closeSync, fstatSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { FulcraError, getColumn } from '../engine/core';
import type { EngineWarning, ModelSpec, TermSpec } from '../engine/core';
import { POOL_MIN_ROWS, installRowPool } from '../engine/numerics';
import type { RowDiagnostics } from '../engine/diagnostics';
import { pointsStep, runAnalysis, type AnalysisRecord, type AnalysisRequestInput } from '../engine/workflow';
import type { PointsRecord } from '../engine/workflow';
import { compareWithPredictors, type PredictorComparison } from '../engine/workflow';
import { subgroupStep } from '../engine/workflow';
import type { SubgroupPerformance } from '../engine/subgroups';
import { importFile } from '../io/importFile';
import { installPartReaders, PARALLEL_MIN_BYTES } from '../io/parallelParse';
import { monitorImported } from '../io';
import type { MonitoringRecord } from '../engine/monitoring';
import { proposeOutcomeEvent } from '../io/outcome';
import type { ColumnType, ImportOptions, ImportResult } from '../io/types';
import type { FitArgs } from './args';
import { defaultThreads, startNodeRowPool } from './nodeRowPool';
import { estimateFit, minutesWarning, type Progress } from './progress';

/** How a file was read: detected format, each column's type with the reason, missing counts, import warnings. */
export interface DataBlock {
  file: string;
  rows: number;
  format: ImportResult['format'];
  columns: { name: string; type: ColumnType; reason: string; missing: number }[];
  warnings: EngineWarning[];
}

/**
 * The record `npm run fit --json` prints: Fulcra's version and the arguments, how the data (and the --test
 * file) were read, then the engine's AnalysisRecord, field for field the one the page holds.
 */
export type FitRun = {
  fulcra: { version: string; command: string[] };
  data: DataBlock & { test: DataBlock | null };
  /** `--diagnostics`: the per-row arrays (rows used, in data order, named by spreadsheet row) beside the record. */
  rowDiagnostics?: RowDiagnostics;
  /** `--monitor FILE`: how the monitoring file was read and the engine's MonitoringRecord (as the page's). */
  monitoring?: MonitoringRecord & { file: DataBlock };
  /** `--points` / `--points-base X`: the bedside points score and its evaluation (the page's record). */
  points?: PointsRecord;
  /** `--compare-with a,b,c`: the second model and its comparison with the main one (workflow/compareStep). */
  comparison?: PredictorComparison;
  /** `--subgroups COL [--subgroup-cuts …]`: performance per group (workflow/subgroupStep, the page's record). */
  subgroups?: SubgroupPerformance;
} & AnalysisRecord;

/** The first bytes of a zip archive (an Excel workbook). */
const ZIP = [0x50, 0x4b, 0x03, 0x04];

/**
 * The file's bytes, or a message naming the file when it cannot be read. `shared`: a delimited file that will be read
 * in parts goes into shared memory, where the helpers read their parts in place instead of each getting a copy (a
 * workbook, known by its first bytes, is unzipped from ordinary memory).
 */
function readBytes(file: string, shared = false): Uint8Array {
  try {
    const fd = openSync(file, 'r');
    try {
      const size = fstatSync(fd).size;
      const head = new Uint8Array(ZIP.length);
      if (shared && readSync(fd, head, 0, head.length, 0) === head.length && ZIP.every((b, k) => head[k] === b))
        shared = false;
      if (!shared) {
        // a plain Uint8Array over the Buffer's memory: the importer expects its slice (a copy) and indexOf (V8's,
        // not Buffer's, whose every call goes through Node's C++: counting 10⁶ lines took 0.21 s instead of 0.07 s)
        const b = readFileSync(fd);
        return new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
      }
      const bytes = new Uint8Array(new SharedArrayBuffer(size));
      for (let at = 0; at < size;) {
        const got = readSync(fd, bytes, at, size - at, at);
        if (got === 0) throw new Error('the file became shorter while it was read');
        at += got;
      }
      return bytes;
    } finally {
      closeSync(fd);
    }
  } catch (e) {
    throw new FulcraError('file-not-read', `Cannot read "${file}": ${(e as Error).message}.`);
  }
}

/** Reads the bytes of `file` as a table with the arguments' import options. */
function importBytes(bytes: Uint8Array, file: string, args: FitArgs, progress?: Progress): Promise<ImportResult> {
  const columnTypes: Record<string, ColumnType> = {};
  for (const c of args.categorical) columnTypes[c] = 'categorical';
  const options: ImportOptions = { columnTypes };
  if (args.delimiter) options.delimiter = args.delimiter as ImportOptions['delimiter'];
  if (args.decimal) options.decimal = args.decimal;
  if (args.sheet) options.sheet = args.sheet;
  progress?.stage(`Reading ${basename(file)}`);
  return importFile(bytes, basename(file), options, { onProgress: (f) => progress?.update(f, 1) });
}

export async function loadTable(file: string, args: FitArgs, progress?: Progress): Promise<ImportResult> {
  return importBytes(readBytes(file), file, args, progress);
}

/** getColumn, whose message for a workbook of several sheets also names the sheet read and the others. */
function columnOf(table: ImportResult, name: string) {
  try {
    return getColumn(table.dataset, name);
  } catch (e) {
    const { sheet, sheets } = table.format;
    if (!(e instanceof FulcraError) || !sheet || !sheets || sheets.length < 2) throw e;
    const known = table.dataset.columns.map((c) => c.name).join(', ');
    throw new FulcraError(
      e.code,
      `There is no column named "${name}" in sheet "${sheet}" (its columns are: ${known}). ` +
        `The workbook has ${sheets.length} sheets: ${sheets.map((n) => `"${n}"`).join(', ')}.`,
      'Choose the sheet that holds the data with --sheet NAME (the first sheet is read unless told).',
    );
  }
}

/** The file's size in bytes (0 when it cannot be read: loadTable then says why). */
function fileBytes(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}

/** Builds the model specification from the arguments and the imported columns. */
export function buildSpec(args: FitArgs, table: ImportResult): ModelSpec {
  const { dataset, columns } = table;
  const getColumn = (_: unknown, name: string) => columnOf(table, name);
  const outcomeCol = getColumn(dataset, args.outcome);
  const layout: ModelSpec['layout'] =
    args.trials !== undefined
      ? { kind: 'events-trials', trials: args.trials }
      : args.nonEvents !== undefined
        ? { kind: 'events-nonevents', nonEvents: args.nonEvents }
        : undefined;
  const roleColumns = [args.outcome, args.trials, args.nonEvents, args.weights].filter((c) => c !== undefined);
  for (const c of roleColumns) getColumn(dataset, c);
  let event = args.event;
  if (layout) event = undefined;
  else if (event === undefined) {
    const proposal = proposeOutcomeEvent(outcomeCol);
    if (proposal.status !== 'proposed') {
      throw new FulcraError(
        'choose-event',
        `${proposal.reason} Say which value is the event with --event VALUE` +
          (proposal.levels.length ? ` (one of: ${proposal.levels.join(', ')}).` : '.'),
      );
    }
    event = proposal.event;
  }
  const predictors =
    args.predictors ?? columns.filter((c) => c.modelling && !roleColumns.includes(c.name)).map((c) => c.name);
  if (predictors.length === 0)
    throw new FulcraError('no-predictors', 'No predictor columns were found; name them with --predictors a,b,c.');
  for (const p of [...predictors, ...Object.keys(args.splines), ...args.interactions.flat()]) getColumn(dataset, p);
  for (const p of predictors) {
    if (p === args.outcome)
      throw new FulcraError('outcome-as-predictor', `"${p}" is the outcome and cannot also be a predictor.`);
  }
  for (const [col] of Object.entries(args.reference)) {
    if (getColumn(dataset, col).kind !== 'categorical') {
      throw new FulcraError(
        'reference-not-categorical',
        `--reference ${col}=…: "${col}" is numeric; add --categorical ${col} to treat it as categorical.`,
      );
    }
  }
  const terms: TermSpec[] = predictors.map((column) =>
    args.splines[column]
      ? { type: 'spline', column, knots: args.splines[column] }
      : { type: 'main', column, reference: args.reference[column] },
  );
  for (const [column, knots] of Object.entries(args.splines)) {
    if (!predictors.includes(column)) terms.push({ type: 'spline', column, knots });
  }
  for (const pair of args.interactions) terms.push({ type: 'interaction', columns: pair });
  const spec: ModelSpec = { outcome: args.outcome, terms };
  if (event !== undefined) spec.event = event;
  if (layout) spec.layout = layout;
  if (args.weights !== undefined) spec.weights = args.weights;
  return spec;
}

/**
 * Runs the whole headless procedure and returns the record (printing is the caller's job); `progress` (stderr in
 * `npm run fit`) hears each stage, its progress, and up front whether the fit will take minutes.
 */
export async function runFit(args: FitArgs, argv: string[], version: string, progress?: Progress): Promise<FitRun> {
  // Large data: a pool of threads for the row passes, as the page starts one (the same numbers on any count); for a
  // large file started first, so that its helpers also read parts of the file.
  const threads = args.threads ?? defaultThreads();
  const large = threads > 1 && fileBytes(args.file) >= PARALLEL_MIN_BYTES;
  // The helpers start on their own threads while this one reads the file (each about 0.1 s at 37 MB).
  const starting = large ? startNodeRowPool(threads) : null;
  let bytes: Uint8Array;
  try {
    bytes = readBytes(args.file, large);
  } catch (e) {
    await starting?.then((p) => p.close()).catch(() => undefined);
    throw e;
  }
  let pool = starting ? await starting : null;
  if (pool) installPartReaders(pool.partReaders);
  try {
    const table = await importBytes(bytes, args.file, args, progress);
    installPartReaders(null);
    if (pool && table.dataset.nRows < POOL_MIN_ROWS) {
      await pool.close();
      pool = null;
    }
    if (!pool && threads > 1 && table.dataset.nRows >= POOL_MIN_ROWS) pool = await startNodeRowPool(threads);
    if (pool) installRowPool(pool.pool);
    return await runFitOn(table, args, argv, version, progress);
  } finally {
    installPartReaders(null);
    if (pool) {
      installRowPool(null);
      await pool.close();
    }
  }
}

/** The analysis request of the arguments; the engine fills every default (the same ones the page gets). */
export function requestFromArgs(args: FitArgs, spec: ModelSpec): AnalysisRequestInput {
  const method = args.firth ? 'firth' : args.ridge !== undefined ? 'ridge' : (args.penalty ?? 'ml');
  const lambda = args.ridge ?? args.lambda ?? args.lambdaRule;
  // --cv K: the folds of λ selection when λ is cross-validated, otherwise repeated K-fold CV (10 repeats).
  const selectsLambda = args.penalty !== undefined && typeof lambda !== 'number';
  const validation =
    args.bootstrap !== undefined
      ? { method: 'bootstrap' as const, replicates: args.bootstrap, seed: args.seed }
      : args.cv !== undefined && !selectsLambda
        ? { method: 'repeated-cv' as const, folds: args.cv, repeats: 10, seed: args.seed }
        : undefined;
  return {
    spec,
    method,
    level: args.level,
    alpha: args.penalty === 'elastic-net' ? args.alpha : undefined,
    lambda,
    folds: selectsLambda ? args.cv : undefined,
    costs: args.costs,
    threshold: args.threshold,
    validation,
    seed: args.seed,
    maxIter: args.maxIter,
    leaveOut: args.leaveOut,
    profile: args.noProfile ? false : undefined,
    termTests: args.noTermTests ? false : undefined,
  };
}

function dataBlock(file: string, table: ImportResult): DataBlock {
  return {
    file: basename(file),
    rows: table.dataset.nRows,
    format: table.format,
    columns: table.columns.map((c) => ({ name: c.name, type: c.type, reason: c.reason, missing: c.profile.missing })),
    warnings: table.warnings,
  };
}

async function runFitOn(
  table: ImportResult,
  args: FitArgs,
  argv: string[],
  version: string,
  progress?: Progress,
): Promise<FitRun> {
  const spec = buildSpec(args, table);
  const test = args.test ? await loadTable(args.test, args, progress) : null;
  const request = requestFromArgs(args, spec);
  const estimate = estimateFit(table.dataset, request);
  const warn = estimate && minutesWarning(estimate);
  if (warn) progress?.say(warn);
  progress?.stage('Fitting and checking the model');
  const hooks = { onProgress: (done: number, total: number) => progress?.update(done, total) };
  const { record, scores, diagnostics } = await runAnalysis(table.dataset, request, hooks, test?.dataset);
  if (args.compareWith) progress?.stage('Fitting and comparing the second model');
  const comparison = args.compareWith
    ? await compareWithPredictors(table.dataset, { record, scores }, args.compareWith, hooks)
    : undefined;
  const subgroups = args.subgroups
    ? subgroupStep(table.dataset, record, scores, { column: args.subgroups, cutPoints: args.subgroupCuts })
    : undefined;
  const monitoring = args.monitor ? await monitorRun(args, record, progress) : undefined;
  const points = args.points
    ? pointsStep(record, table.dataset, args.pointsBase ? { baseUnit: args.pointsBase } : {})
    : undefined;
  return {
    fulcra: { version, command: argv },
    data: { ...dataBlock(args.file, table), test: test ? dataBlock(args.test!, test) : null },
    ...record,
    ...(args.diagnostics ? { rowDiagnostics: diagnostics } : {}),
    ...(monitoring ? { monitoring } : {}),
    ...(points ? { points } : {}),
    ...(comparison ? { comparison } : {}),
    ...(subgroups ? { subgroups } : {}),
  };
}

/** `--monitor FILE --date COL [--unit COL]`: the fitted model applied to later cases, by the page's io path. */
async function monitorRun(
  args: FitArgs,
  record: AnalysisRecord,
  progress?: Progress,
): Promise<MonitoringRecord & { file: DataBlock }> {
  const table = await loadTable(args.monitor!, args, progress);
  progress?.stage('Monitoring the later cases');
  const { record: m } = monitorImported({ ...record.fit, source: 'current-fit', name: 'current fit' }, table, {
    dateColumn: args.date!,
    unitColumn: args.unit ?? null,
    ...(args.period ? { period: args.period } : {}),
    ...(args.arl0 !== undefined ? { targetArl0: args.arl0 } : {}),
    ...(args.level !== undefined ? { level: args.level } : {}),
    seed: args.seed,
  });
  return { file: dataBlock(args.monitor!, table), ...m };
}
