import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { bootstrapValidation, repeatedCrossValidation, type InternalValidation } from '../engine/validation';
import { FulcraError, getColumn } from '../engine/core';
import { linearPredictorFromRecipe } from '../engine/design';
import { evaluate, type EvaluationRecord } from '../engine/evaluation';
import { externalValidation, type ExternalValidation } from '../engine/validation';
import { fit } from '../engine/fitting';
import type { FitOptions, FitResult, ModelSpec, TermSpec } from '../engine/core';
import { fitPipeline, type Pipeline, type PipelineFit } from '../engine/validation';
import { riley2020SampleSize, coxSnellR2, type SampleSizeResult } from '../engine/evaluation';
import type { EngineWarning } from '../engine/core';
import { importFile } from '../io/importFile';
import { proposeOutcomeEvent } from '../io/outcome';
import type { ColumnType, ImportOptions, ImportResult } from '../io/types';
import type { FitArgs } from './args';
import { CHUNK_ROWS, installRowPool } from '../engine/numerics';
import { defaultThreads, startNodeRowPool } from './nodeRowPool';

/** The record `npm run fit --json` prints: the same engine records the page shows. */
export interface FitRun {
  fulcra: { version: string; command: string[] };
  data: {
    file: string;
    rows: number;
    format: ImportResult['format'];
    columns: { name: string; type: ColumnType; reason: string; missing: number }[];
    warnings: EngineWarning[];
  };
  spec: ModelSpec;
  /** Maximum likelihood, Firth or fixed-λ ridge: the full inference record. */
  fit: FitResult | null;
  /** λ chosen by cross-validation (lasso, elastic net, ridge): coefficients only. */
  penalised: PipelineFit | null;
  evaluation: Omit<EvaluationRecord, 'prepared'>;
  sampleSize: SampleSizeResult | null;
  validation: InternalValidation | null;
  external:
    | (Omit<ExternalValidation, 'evaluation' | 'y' | 'eta' | 'risk' | 'rowsUsed'> & {
        file: string;
        evaluation: Omit<EvaluationRecord, 'prepared'>;
      })
    | null;
}

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
        `${proposal.reason} Say which value is the event with --event VALUE${proposal.levels.length ? ` (one of: ${proposal.levels.join(', ')})` : ''}.`,
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

const stripPrepared = (e: EvaluationRecord): Omit<EvaluationRecord, 'prepared'> => {
  const { prepared: _prepared, ...rest } = e;
  return rest;
};

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

async function runFitOn(table: ImportResult, args: FitArgs, argv: string[], version: string): Promise<FitRun> {
  const spec = buildSpec(args, table);
  const data = table.dataset;
  const fitOptions: Partial<FitOptions> = args.firth
    ? { method: 'firth' }
    : args.ridge !== undefined
      ? { method: 'ridge', lambda: args.ridge }
      : { method: 'ml' };
  const pipeline: Pipeline = {
    data,
    spec,
    fitOptions,
    seed: args.seed,
    penalty: args.penalty
      ? {
          alpha: args.penalty === 'lasso' ? 1 : args.penalty === 'ridge' ? 0 : (args.alpha ?? 0.5),
          lambda: 'cv-1se',
          folds: args.cv ?? 10,
          criterion: 'deviance',
          nLambda: 100,
        }
      : null,
  };
  let result: FitResult | null = null;
  let penalised: PipelineFit | null = null;
  if (pipeline.penalty) penalised = await fitPipeline(pipeline);
  else result = fit(data, spec, fitOptions);
  const model = (result ?? penalised)!;

  const enc = linearPredictorFromRecipe(
    model.recipe,
    model.coefficients.map((c) => c.estimate),
    data,
  );
  const eta = enc.eta;
  const risk = eta.map((e) => 1 / (1 + Math.exp(-e)));
  const costs = args.costs ? { falseNegative: args.costs.fn, falsePositive: args.costs.fp } : undefined;
  const evaluation = evaluate(enc.y!, risk, { eta, costs, threshold: args.threshold });

  let sampleSize: SampleSizeResult | null = null;
  const parameters = model.recipe.columnNames.length - 1;
  if (result && parameters >= 1 && result.events > 0 && result.nonEvents > 0) {
    const r2 =
      result.method === 'ml' && result.converged
        ? coxSnellR2(result.deviance, result.nullDeviance, result.nUsed)
        : undefined;
    sampleSize = riley2020SampleSize({
      parameters,
      outcomeProportion: result.events / result.nUsed,
      r2cs: r2 !== undefined && r2 > 0 ? r2 : undefined,
      actual: { n: result.nUsed, events: Math.min(result.events, result.nonEvents) },
    });
  }

  let validation: InternalValidation | null = null;
  if (args.bootstrap !== undefined)
    validation = await bootstrapValidation(pipeline, { B: args.bootstrap, seed: args.seed });
  else if (args.cv !== undefined && !args.penalty)
    validation = await repeatedCrossValidation(pipeline, { folds: args.cv, repeats: 10, seed: args.seed });

  let external: FitRun['external'] = null;
  if (args.test) {
    const testTable = await loadTable(args.test, args);
    const ev = externalValidation(model, testTable.dataset, { costs, threshold: args.threshold });
    const { evaluation: e, y: _y, eta: _e, risk: _r, rowsUsed: _u, ...rest } = ev;
    external = { ...rest, file: basename(args.test), evaluation: stripPrepared(e) };
  }

  return {
    fulcra: { version, command: argv },
    data: {
      file: basename(args.file),
      rows: data.nRows,
      format: table.format,
      columns: table.columns.map((c) => ({ name: c.name, type: c.type, reason: c.reason, missing: c.profile.missing })),
      warnings: table.warnings,
    },
    spec,
    fit: result,
    penalised,
    evaluation: stripPrepared(evaluation),
    sampleSize,
    validation,
    external,
  };
}
