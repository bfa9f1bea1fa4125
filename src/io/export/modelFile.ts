import { FulcraError } from '../../engine/core';
import type { CoefficientRow, DesignRecipe, FitMethod, FitResult, TermRow } from '../../engine/core';
import type { EngineWarning } from '../../engine/core';
import type { PointsScore } from '../../engine/points';

/** Current model-file schema version (the value of the `fulcraModel` field). */
export const MODEL_FILE_VERSION = 1;

/**
 * Fulcra model file, schema version 1 (JSON, UTF-8, suggested extension `.fulcra-model.json`).
 *
 * - `fulcraModel`: 1 — schema version; readers refuse other values.
 * - `fulcraVersion`, `created` (ISO 8601), `dataChecksum` (SHA-256 hex of the training Dataset, see
 *   datasetChecksum(), or null).
 * - `recipe`: the DesignRecipe (outcome, event level, terms with levels/reference/knots, design column names
 *   intercept first) — everything needed to rebuild the design for new data; optional `ranges`, the
 *   [min, max] of each numeric predictor over the rows fitted (scoring warns outside them).
 * - `coefficients`: one row per design column in `recipe.columnNames` order: estimate (on the logit scale),
 *   se / p / Wald and profile limits (null where not available or not finite), aliased flag; optional
 *   `profileLowerUnbounded` / `profileUpperUnbounded` (the limit runs to −∞ / +∞; its number is then null).
 * - `covariance`: row-major p×p covariance of the estimates, or null (ridge).
 * - `fit`: method, λ, CI level, convergence and the training fit statistics; optional `penalisedLogLik` (Firth;
 *   null otherwise) and `testLikelihood` ('ordinary' | 'penalised': the likelihood of the model and term tests).
 *   Files saved before these optional fields lack them.
 * - `training`: file name, row count and optional performance summary; optional `rowsLeftOut`, the spreadsheet rows
 *   left out of the fit on request ("what if these rows were left out?"; absent when none were).
 * - `threshold`: chosen risk threshold with its two costs, or null.
 * - `notes`: the user's purpose / setting / population text and free notes (each optional).
 * - `warnings`: the fit's warnings at the time of saving.
 * - `points` (optional; absent when no bedside points score was built, and in older files): the points score of
 *   the model (the engine's PointsScore: points per category or range of each predictor, the table from total points
 *   to risk, the base unit), checked on reading by readPointsScore and against the recipe's terms.
 * Risk for a row is 1 / (1 + exp(−Σ_j coefficients[j].estimate · x_j)) with x the recipe's design row.
 */
export interface ModelFile {
  fulcraModel: 1;
  fulcraVersion: string;
  created: string;
  dataChecksum: string | null;
  recipe: DesignRecipe;
  coefficients: ModelFileCoefficient[];
  terms: TermRow[];
  covariance: number[] | null;
  fit: {
    method: FitMethod;
    lambda: number;
    level: number;
    converged: boolean;
    iterations: number;
    nUsed: number;
    nDropped: number;
    events: number;
    nonEvents: number;
    parameters: number;
    deviance: number;
    nullDeviance: number;
    logLik: number;
    penalisedLogLik?: number | null;
    testLikelihood?: 'ordinary' | 'penalised';
    aic: number | null;
    bic: number | null;
    modelLrChi2: number | null;
    modelDf: number;
    modelLrP: number | null;
  };
  training: {
    fileName: string | null;
    rows: number | null;
    performance: { auc?: number; calibrationSlope?: number; calibrationIntercept?: number; brier?: number } | null;
    /** Spreadsheet rows left out of the fit on request; absent when none were (and in older files). */
    rowsLeftOut?: number[];
  };
  /** The cut-off and the two costs it was chosen with (files before this version said costFalseNegative/Positive). */
  threshold: { value: number; costMissedCase: number; costFalseAlarm: number } | null;
  /** The committee's words for the summary; `notes` (free text) was added later, so older files lack it. */
  notes: { purpose?: string; setting?: string; population?: string; notes?: string };
  warnings: EngineWarning[];
  /** The bedside points score built from this model, when one was; absent otherwise (and in older files). */
  points?: PointsScore;
}

export interface ModelFileCoefficient {
  name: string;
  term: string;
  estimate: number;
  se: number | null;
  p: number | null;
  waldLower: number | null;
  waldUpper: number | null;
  profileLower: number | null;
  profileUpper: number | null;
  profileLowerUnbounded?: boolean;
  profileUpperUnbounded?: boolean;
  aliased: boolean;
}

export interface ModelFileInfo {
  fulcraVersion: string;
  created?: string;
  dataChecksum?: string | null;
  fileName?: string | null;
  rows?: number | null;
  performance?: ModelFile['training']['performance'];
  threshold?: ModelFile['threshold'];
  notes?: ModelFile['notes'];
  rowsLeftOut?: number[];
  /** The bedside points score of this fit, when one was built. */
  points?: PointsScore;
}

const finiteOrNull = (x: number | null): number | null => (x === null || !Number.isFinite(x) ? null : x);

/** Builds the model-file record from a fit. Throws when an estimate is not finite (the model cannot be scored). */
export function createModelFile(fit: FitResult, info: ModelFileInfo): ModelFile {
  const bad = fit.coefficients.find((c) => !Number.isFinite(c.estimate));
  if (bad)
    throw new FulcraError(
      'model-not-finite',
      `The coefficient of "${bad.name}" is ${bad.estimate}; ` +
        'a model with non-finite coefficients cannot be saved for scoring.',
      'Refit with Firth or ridge penalisation.',
    );
  return {
    fulcraModel: 1,
    fulcraVersion: info.fulcraVersion,
    created: info.created ?? new Date().toISOString(),
    dataChecksum: info.dataChecksum ?? null,
    recipe: structuredCloneRecipe(fit.recipe),
    coefficients: fit.coefficients.map((c) => ({
      name: c.name,
      term: c.term,
      estimate: c.estimate,
      se: finiteOrNull(c.se),
      p: finiteOrNull(c.p),
      waldLower: finiteOrNull(c.waldLower),
      waldUpper: finiteOrNull(c.waldUpper),
      profileLower: finiteOrNull(c.profileLower),
      profileUpper: finiteOrNull(c.profileUpper),
      ...(c.profileLowerUnbounded === undefined ? {} : { profileLowerUnbounded: c.profileLowerUnbounded }),
      ...(c.profileUpperUnbounded === undefined ? {} : { profileUpperUnbounded: c.profileUpperUnbounded }),
      aliased: c.aliased,
    })),
    terms: fit.terms.map((t) => ({
      name: t.name,
      columns: [...t.columns],
      df: t.df,
      lrChi2: finiteOrNull(t.lrChi2),
      lrP: finiteOrNull(t.lrP),
    })),
    covariance: fit.covariance && fit.covariance.every(Number.isFinite) ? [...fit.covariance] : null,
    fit: {
      method: fit.method,
      lambda: fit.lambda,
      level: fit.level,
      converged: fit.converged,
      iterations: fit.iterations,
      nUsed: fit.nUsed,
      nDropped: fit.nDropped,
      events: fit.events,
      nonEvents: fit.nonEvents,
      parameters: fit.parameters,
      deviance: fit.deviance,
      nullDeviance: fit.nullDeviance,
      logLik: fit.logLik,
      ...(fit.penalisedLogLik === undefined ? {} : { penalisedLogLik: finiteOrNull(fit.penalisedLogLik) }),
      ...(fit.testLikelihood === undefined ? {} : { testLikelihood: fit.testLikelihood }),
      aic: fit.aic,
      bic: fit.bic,
      modelLrChi2: fit.modelLrChi2,
      modelDf: fit.modelDf,
      modelLrP: fit.modelLrP,
    },
    training: {
      fileName: info.fileName ?? null,
      rows: info.rows ?? null,
      performance: info.performance ?? null,
      ...(info.rowsLeftOut && info.rowsLeftOut.length > 0 ? { rowsLeftOut: [...info.rowsLeftOut] } : {}),
    },
    threshold: info.threshold ?? null,
    notes: { ...(info.notes ?? {}) },
    warnings: fit.warnings.map((w) => ({ ...w })),
    ...(info.points ? { points: JSON.parse(JSON.stringify(info.points)) as PointsScore } : {}),
  };
}

function structuredCloneRecipe(r: DesignRecipe): DesignRecipe {
  return JSON.parse(JSON.stringify(r)) as DesignRecipe;
}

/** The model file as JSON text (2-space indent; doubles print with round-trip precision). */
export function modelFileToJson(file: ModelFile): string {
  return JSON.stringify(file, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}

/**
 * A FitResult-shaped record rebuilt from a model file, for the engine's predict() and for reports. Fields the
 * file does not keep (z, odds ratio) are recomputed; the warnings are those saved with the model.
 */
export function modelFileToFitResult(file: ModelFile): FitResult {
  const coefficients: CoefficientRow[] = file.coefficients.map((k) => ({
    ...k,
    z: k.se === null || k.se === 0 ? null : k.estimate / k.se,
    oddsRatio: Math.exp(k.estimate),
  }));
  const f = file.fit;
  return {
    ...f,
    coefficients,
    terms: file.terms.map((t) => ({ ...t, columns: [...t.columns] })),
    droppedByColumn: {},
    eventsPerParameter: f.parameters > 0 ? f.events / f.parameters : NaN,
    covariance: file.covariance ? [...file.covariance] : null,
    recipe: structuredCloneRecipe(file.recipe),
    warnings: file.warnings.map((w) => ({ ...w })),
  };
}
