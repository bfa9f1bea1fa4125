import { FulcraError } from '../../engine/core';
import type { DesignRecipe } from '../../engine/core';
import type { EngineWarning } from '../../engine/core';
import { MODEL_FILE_VERSION, type ModelFile } from './modelFile';
import { FieldChecker, parseJsonFile } from './validate';
import { readModelPoints } from './readModelPoints';
import { checkLayout } from './workspaceFile';

/**
 * Reads and validates a model file. Throws FulcraError 'model-file-invalid' (not JSON, or a field missing or of
 * the wrong type, naming the field), or 'model-file-version' (not a Fulcra model file, or a newer schema).
 */
export function readModelFile(text: string): ModelFile {
  const raw = parseJsonFile(text, 'model-file-invalid', 'Fulcra model file');
  const c = new FieldChecker('model-file-invalid', 'model file');
  const o = c.object(raw, '(file)');
  if (!('fulcraModel' in o)) {
    const hint = 'fulcraWorkspace' in o ? ' It looks like a workspace file; open it with "Open workspace".' : '';
    throw new FulcraError(
      'model-file-version',
      `This is not a Fulcra model file (it has no "fulcraModel" field).${hint}`,
      'Choose a file saved with "Save model".',
    );
  }
  if (o.fulcraModel !== MODEL_FILE_VERSION) {
    throw new FulcraError(
      'model-file-version',
      `This model file has schema version ${JSON.stringify(o.fulcraModel)}; ` +
        `this Fulcra reads version ${MODEL_FILE_VERSION}.`,
      'Open it with the Fulcra version that saved it, or save the model again.',
    );
  }
  const recipe = checkRecipe(c, o.recipe);
  const coefs = c.array(o.coefficients, 'coefficients').map((x, i) => {
    const p = `coefficients[${i}]`;
    const r = c.object(x, p);
    return {
      name: c.string(r.name, `${p}.name`),
      term: c.string(r.term, `${p}.term`),
      estimate: c.finite(r.estimate, `${p}.estimate`),
      se: c.numberOrNull(r.se, `${p}.se`),
      p: c.numberOrNull(r.p, `${p}.p`),
      waldLower: c.numberOrNull(r.waldLower, `${p}.waldLower`),
      waldUpper: c.numberOrNull(r.waldUpper, `${p}.waldUpper`),
      profileLower: c.numberOrNull(r.profileLower, `${p}.profileLower`),
      profileUpper: c.numberOrNull(r.profileUpper, `${p}.profileUpper`),
      // Optional: files saved before the unbounded-limit flags lack them.
      ...(r.profileLowerUnbounded === undefined
        ? {}
        : { profileLowerUnbounded: c.boolean(r.profileLowerUnbounded, `${p}.profileLowerUnbounded`) }),
      ...(r.profileUpperUnbounded === undefined
        ? {}
        : { profileUpperUnbounded: c.boolean(r.profileUpperUnbounded, `${p}.profileUpperUnbounded`) }),
      aliased: c.boolean(r.aliased, `${p}.aliased`),
    };
  });
  if (coefs.length !== recipe.columnNames.length)
    c.fail('coefficients', `has ${coefs.length} rows but recipe.columnNames has ${recipe.columnNames.length}`);
  coefs.forEach((k, i) => {
    if (k.name !== recipe.columnNames[i])
      c.fail(`coefficients[${i}].name`, `is "${k.name}" but recipe.columnNames[${i}] is "${recipe.columnNames[i]}"`);
  });
  const terms = c.array(o.terms, 'terms').map((x, i) => {
    const r = c.object(x, `terms[${i}]`);
    return {
      name: c.string(r.name, `terms[${i}].name`),
      columns: c.numberArray(r.columns, `terms[${i}].columns`),
      df: c.number(r.df, `terms[${i}].df`),
      lrChi2: c.numberOrNull(r.lrChi2, `terms[${i}].lrChi2`),
      lrP: c.numberOrNull(r.lrP, `terms[${i}].lrP`),
    };
  });
  const covariance = o.covariance === null ? null : c.numberArray(o.covariance, 'covariance');
  if (covariance && covariance.length !== coefs.length * coefs.length)
    c.fail('covariance', `must have ${coefs.length * coefs.length} entries (p×p), has ${covariance.length}`);
  const f = c.object(o.fit, 'fit');
  const num = (k: string) => c.number(f[k], `fit.${k}`);
  const numOrNull = (k: string) => (f[k] === null ? null : num(k));
  const t = c.object(o.training, 'training');
  const th = o.threshold === null || o.threshold === undefined ? null : c.object(o.threshold, 'threshold');
  const notes = o.notes === undefined ? {} : c.object(o.notes, 'notes');
  const warnings =
    o.warnings === undefined
      ? []
      : c.array(o.warnings, 'warnings').map((x, i) => {
          const w = c.object(x, `warnings[${i}]`);
          const out: EngineWarning = {
            code: c.string(w.code, `warnings[${i}].code`),
            message: c.string(w.message, `warnings[${i}].message`),
            suggestion: c.string(w.suggestion, `warnings[${i}].suggestion`),
          };
          if (w.terms !== undefined) out.terms = c.stringArray(w.terms, `warnings[${i}].terms`);
          return out;
        });
  const perf =
    t.performance === null || t.performance === undefined ? null : c.object(t.performance, 'training.performance');
  return {
    fulcraModel: 1,
    fulcraVersion: c.string(o.fulcraVersion, 'fulcraVersion'),
    created: c.string(o.created, 'created'),
    dataChecksum: o.dataChecksum === null ? null : c.string(o.dataChecksum, 'dataChecksum'),
    recipe,
    coefficients: coefs,
    terms,
    covariance,
    fit: {
      method: c.oneOf(f.method, ['ml', 'ridge', 'firth', 'lasso', 'elastic-net'] as const, 'fit.method'),
      lambda: num('lambda'),
      level: num('level'),
      converged: c.boolean(f.converged, 'fit.converged'),
      iterations: num('iterations'),
      nUsed: num('nUsed'),
      nDropped: num('nDropped'),
      events: num('events'),
      nonEvents: num('nonEvents'),
      parameters: num('parameters'),
      deviance: num('deviance'),
      nullDeviance: num('nullDeviance'),
      logLik: num('logLik'),
      // Optional: files saved before Firth's penalised tests were labelled lack them.
      ...(f.penalisedLogLik === undefined ? {} : { penalisedLogLik: numOrNull('penalisedLogLik') }),
      ...(f.testLikelihood === undefined
        ? {}
        : { testLikelihood: c.oneOf(f.testLikelihood, ['ordinary', 'penalised'] as const, 'fit.testLikelihood') }),
      aic: numOrNull('aic'),
      bic: numOrNull('bic'),
      modelLrChi2: numOrNull('modelLrChi2'),
      modelDf: num('modelDf'),
      modelLrP: numOrNull('modelLrP'),
    },
    training: {
      fileName: t.fileName === null || t.fileName === undefined ? null : c.string(t.fileName, 'training.fileName'),
      rows: t.rows === null || t.rows === undefined ? null : c.number(t.rows, 'training.rows'),
      performance: perf
        ? Object.fromEntries(Object.entries(perf).map(([k, v]) => [k, c.number(v, `training.performance.${k}`)]))
        : null,
      ...(t.rowsLeftOut === undefined ? {} : { rowsLeftOut: c.numberArray(t.rowsLeftOut, 'training.rowsLeftOut') }),
    },
    threshold: th
      ? {
          value: c.finite(th.value, 'threshold.value'),
          // Files written before the one cost vocabulary name the costs costFalseNegative / costFalsePositive.
          costMissedCase:
            'costMissedCase' in th
              ? c.finite(th.costMissedCase, 'threshold.costMissedCase')
              : c.finite(th.costFalseNegative, 'threshold.costFalseNegative'),
          costFalseAlarm:
            'costFalseAlarm' in th
              ? c.finite(th.costFalseAlarm, 'threshold.costFalseAlarm')
              : c.finite(th.costFalsePositive, 'threshold.costFalsePositive'),
        }
      : null,
    notes: Object.fromEntries(Object.entries(notes).map(([k, v]) => [k, c.string(v, `notes.${k}`)])),
    warnings,
    // Optional: files saved without a points score (and before it existed) lack it.
    ...(o.points === undefined ? {} : { points: readModelPoints(o.points, recipe) }),
  };
}

function checkRecipe(c: FieldChecker, v: unknown): DesignRecipe {
  const r = c.object(v, 'recipe');
  const terms = c.array(r.terms, 'recipe.terms').map((x, i): DesignRecipe['terms'][number] => {
    const p = `recipe.terms[${i}]`;
    const t = c.object(x, p);
    const type = c.oneOf(t.type, ['numeric', 'categorical', 'spline', 'interaction'] as const, `${p}.type`);
    const name = c.string(t.name, `${p}.name`);
    switch (type) {
      case 'numeric':
        return { type, name, column: c.string(t.column, `${p}.column`) };
      case 'categorical': {
        const levels = c.stringArray(t.levels, `${p}.levels`);
        const reference = c.string(t.reference, `${p}.reference`);
        if (!levels.includes(reference)) c.fail(`${p}.reference`, `("${reference}") is not one of the levels`);
        return { type, name, column: c.string(t.column, `${p}.column`), levels, reference };
      }
      case 'spline': {
        const knots = c.numberArray(t.knots, `${p}.knots`);
        if (knots.length < 3) c.fail(`${p}.knots`, 'must list at least 3 knots');
        return { type, name, column: c.string(t.column, `${p}.column`), knots };
      }
      case 'interaction': {
        const parts = c.stringArray(t.parts, `${p}.parts`);
        if (parts.length !== 2) c.fail(`${p}.parts`, 'must name exactly two terms');
        return { type, name, parts: [parts[0], parts[1]] };
      }
    }
  });
  return {
    outcome: c.string(r.outcome, 'recipe.outcome'),
    event: c.string(r.event, 'recipe.event'),
    terms,
    columnNames: c.stringArray(r.columnNames, 'recipe.columnNames'),
    ...(r.ranges === undefined ? {} : { ranges: checkRanges(c, r.ranges) }),
    ...(r.layout === undefined ? {} : { layout: checkLayout(c, r.layout, 'recipe.layout') }),
    ...(r.weights === undefined ? {} : { weights: c.string(r.weights, 'recipe.weights') }),
  };
}

/** recipe.ranges (optional; files saved before it have none): {column: [min, max]}. */
function checkRanges(c: FieldChecker, v: unknown): Record<string, [number, number]> {
  const o = c.object(v, 'recipe.ranges');
  const out: Record<string, [number, number]> = {};
  for (const [name, x] of Object.entries(o)) {
    const pair = c.numberArray(x, `recipe.ranges.${name}`);
    if (pair.length !== 2 || !(pair[0] <= pair[1])) c.fail(`recipe.ranges.${name}`, 'must be [min, max]');
    out[name] = [pair[0], pair[1]];
  }
  return out;
}
