import { plural } from '../core/wording';
import { FulcraError, sheetRow, type Column, type Dataset } from '../core/data';
import { designFromRecipe, droppedRowsWarning, parseDecimal } from '../design/design';
import { qnorm } from '../numerics/distributions';
import { sigmoid } from '../numerics/loss';
import type { FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';

export interface Prediction {
  /** Linear predictor (log-odds) per used row. */
  eta: Float64Array;
  risk: Float64Array;
  /** CI of the risk at result.level: η ± z·√(x'Vx) back-transformed; NaN when the fit has no covariance (ridge). */
  lower: Float64Array;
  upper: Float64Array;
  /** Input row index of each prediction (rows with a missing predictor are skipped). */
  rowsUsed: Int32Array;
  warnings: EngineWarning[];
}

/**
 * Risks for the rows of `data` from a fitted model: the design is rebuilt from result.recipe (same coding, knots and
 * reference levels), rows with a missing predictor are skipped (see rowsUsed), an unseen category throws a
 * FulcraError naming the spreadsheet row and column. The outcome column, if present, is ignored.
 */
export function predict(result: FitResult, data: Dataset): Prediction {
  const d = designFromRecipe(result.recipe, data, { outcome: 'ignore' });
  const { X, n, p } = d;
  if (p !== result.coefficients.length) {
    throw new FulcraError(
      'recipe-mismatch',
      `The data give ${p} design columns but the model has ${result.coefficients.length}.`,
    );
  }
  const beta = result.coefficients.map((c) => c.estimate);
  const V = result.covariance;
  const zc = qnorm(0.5 + result.level / 2);
  const eta = new Float64Array(n),
    risk = new Float64Array(n),
    lower = new Float64Array(n),
    upper = new Float64Array(n);
  for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) eta[i] += beta[j] * X[j * n + i];
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(eta[i])) continue;
    let worst = 1;
    for (let j = 2; j < p; j++)
      if (Math.abs(beta[j] * X[j * n + i]) > Math.abs(beta[worst] * X[worst * n + i])) worst = j;
    throw new FulcraError(
      'value-out-of-range',
      `Row ${sheetRow(data, d.rowsUsed[i])}: the value of "${d.columnNames[worst]}" is so extreme that the risk ` +
        'score cannot be computed.',
      'Check the value and its units.',
    );
  }
  const x = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    risk[i] = sigmoid(eta[i]);
    if (!V) {
      lower[i] = NaN;
      upper[i] = NaN;
      continue;
    }
    for (let j = 0; j < p; j++) x[j] = X[j * n + i];
    let v = 0;
    for (let a = 0; a < p; a++) {
      if (x[a] === 0) continue;
      let s = 0;
      for (let b = 0; b < p; b++) s += V[a * p + b] * x[b];
      v += x[a] * s;
    }
    const se = Number.isFinite(v) ? Math.sqrt(Math.max(v, 0)) : Infinity;
    lower[i] = sigmoid(eta[i] - zc * se);
    upper[i] = sigmoid(eta[i] + zc * se);
  }
  const warnings: EngineWarning[] = [];
  if (!V)
    warnings.push(
      warning(
        'no-prediction-interval',
        'This model has no valid covariance matrix (penalised fit or separation), so the risks have no ' +
          'confidence interval.',
        'Use bootstrap validation to judge the uncertainty.',
      ),
    );
  if (d.nDropped > 0) {
    const lead = `${plural(d.nDropped, 'row was', 'rows were')} not scored because of missing values`;
    const hint = 'Fill in the missing values to score those rows.';
    warnings.push(droppedRowsWarning('rows-not-scored', lead, hint, d.droppedByColumn, true));
  }
  return { eta, risk, lower, upper, rowsUsed: d.rowsUsed, warnings };
}

/** Risk for one case given as a plain record of column → value (numbers, or level strings for categorical terms). */
export function predictOne(
  result: FitResult,
  record: Record<string, number | string | null | undefined>,
): { eta: number; risk: number; lower: number; upper: number } {
  const categorical = new Set(result.recipe.terms.flatMap((t) => (t.type === 'categorical' ? [t.column] : [])));
  const needed = new Set(result.recipe.terms.flatMap((t) => (t.type === 'interaction' ? [...t.parts] : [t.column])));
  const columns: Column[] = [...needed].map((name) => {
    const v = record[name];
    if (
      v === null ||
      v === undefined ||
      (typeof v === 'string' && v.trim() === '') ||
      (typeof v === 'number' && Number.isNaN(v))
    ) {
      throw new FulcraError('missing-value', `No value was given for "${name}".`);
    }
    if (categorical.has(name))
      return { kind: 'categorical', name, codes: Int32Array.of(0), levels: [String(v).trim()] };
    const x = typeof v === 'number' ? v : parseDecimal(v);
    if (!Number.isFinite(x))
      throw new FulcraError('not-numeric', `"${name}" must be a plain decimal number, got "${v}".`);
    return { kind: 'numeric', name, values: Float64Array.of(x) };
  });
  const r = predict(result, { nRows: 1, columns });
  return { eta: r.eta[0], risk: r.risk[0], lower: r.lower[0], upper: r.upper[0] };
}
