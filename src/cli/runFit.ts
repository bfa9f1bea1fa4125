import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { FulcraError, getColumn } from '../engine/core';
import type { EngineWarning, ModelSpec, TermSpec } from '../engine/core';
import { CHUNK_ROWS, installRowPool } from '../engine/numerics';
import { analyse, type AnalysisRecord, type AnalysisRequestInput } from '../engine/workflow';
import { importFile } from '../io/importFile';
import { proposeOutcomeEvent } from '../io/outcome';
import type { ColumnType, ImportOptions, ImportResult } from '../io/types';
import type { FitArgs } from './args';
import { defaultThreads, startNodeRowPool } from './nodeRowPool';

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
} & AnalysisRecord;

export async function loadTable(file: string, args: FitArgs): Promise<ImportResult> {
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(file);
  } catch (e) {
    throw new FulcraError('file-not-read', `Cannot read "${file}": ${(e as Error).message}.`);
  }
  const columnTypes: Record<string, ColumnType> = {};
  for (const c of args.categorical) columnTypes[c] = 'categorical';
  const options: ImportOptions = { columnTypes };
  if (args.delimiter) options.delimiter = args.delimiter as ImportOptions['delimiter'];
  if (args.decimal) options.decimal = args.decimal;
  if (args.sheet) options.sheet = args.sheet;
  return importFile(bytes, basename(file), options);
}

/** Builds the model specification from the arguments and the imported columns. */
export function buildSpec(args: FitArgs, table: ImportResult): ModelSpec {
  const { dataset, columns } = table;
  const outcomeCol = getColumn(dataset, args.outcome);
  let event = args.event;
  if (event === undefined) {
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
    args.predictors ?? columns.filter((c) => c.modelling && c.name !== args.outcome).map((c) => c.name);
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
  return { outcome: args.outcome, event, terms };
}

/** Runs the whole headless procedure and returns the record (printing is the caller's job). */
export async function runFit(args: FitArgs, argv: string[], version: string): Promise<FitRun> {
  const table = await loadTable(args.file, args);
  // Large data: a pool of threads for the row passes, as the page starts one (the same numbers on any count).
  const threads = args.threads ?? defaultThreads();
  const pool = threads > 1 && table.dataset.nRows > CHUNK_ROWS ? await startNodeRowPool(threads) : null;
  if (pool) installRowPool(pool.pool);
  try {
    return await runFitOn(table, args, argv, version);
  } finally {
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

async function runFitOn(table: ImportResult, args: FitArgs, argv: string[], version: string): Promise<FitRun> {
  const spec = buildSpec(args, table);
  const test = args.test ? await loadTable(args.test, args) : null;
  const record = await analyse(table.dataset, requestFromArgs(args, spec), {}, test?.dataset);
  return {
    fulcra: { version, command: argv },
    data: { ...dataBlock(args.file, table), test: test ? dataBlock(args.test!, test) : null },
    ...record,
  };
}
