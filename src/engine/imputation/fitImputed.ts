import { FulcraError, sheetRow, type Dataset } from '../core/data';
import { fit } from '../fitting/fit';
import { completeDataset, type MiceHooks, type MiceResult } from './mice';
import type { FitOptions, FitResult, ModelSpec } from '../core/model';
import { poolCoefficients, type PooledCoefficients } from './rubin';
import { warning, type EngineWarning } from '../core/warnings';

export interface FitImputedOptions extends Partial<FitOptions> {
  /**
   * Leave out of every fit the rows whose outcome was imputed: they still inform the imputation of the
   * predictors but add only noise to the model (von Hippel 2007, Sociol Methodol 37:83). Default false.
   */
  excludeImputedOutcome?: boolean;
}

export interface FitImputedResult extends PooledCoefficients {
  method: FitOptions['method'];
  /** Rows of the data, and rows with at least one imputed cell among the imputed columns. */
  nRows: number;
  nImputedRows: number;
  /** Mean over imputations of the events and non-events in the fitted rows. */
  events: number;
  nonEvents: number;
  /** Rows left out because their outcome was imputed (excludeImputedOutcome). */
  nExcluded: number;
  /** Imputations whose fit did not converge. */
  notConverged: number;
}

/**
 * Fits `spec` with fit() on each of the m completed datasets of `imp` and pools the coefficients by
 * Rubin's rules with Barnard–Rubin df (see poolCoefficients). Profile-likelihood intervals are not computed
 * per imputation unless `options.profile` is set; pooled intervals are t intervals. Warnings of the
 * imputation and of the fits are passed on once each, saying in how many imputations they arose.
 */
export async function fitImputed(
  data: Dataset,
  spec: ModelSpec,
  imp: MiceResult,
  options: FitImputedOptions = {},
  hooks: MiceHooks = {},
): Promise<FitImputedResult> {
  if (imp.m < 2)
    throw new FulcraError(
      'too-few-imputations',
      `Pooling needs at least 2 imputations; the imputation has m = ${imp.m}.`,
    );
  const { excludeImputedOutcome = false, ...fitOptions } = options;
  const opts: Partial<FitOptions> = { ...fitOptions, profile: fitOptions.profile ?? false };
  const outcomeRows = excludeImputedOutcome ? imp.imputed.find((c) => c.column === spec.outcome)?.rows : undefined;
  const keep = outcomeRows && outcomeRows.length > 0 ? keptRows(data.nRows, outcomeRows) : null;
  const fits: FitResult[] = [];
  for (let k = 0; k < imp.m; k++) {
    if (hooks.signal?.aborted) throw new FulcraError('cancelled', 'Fitting the imputed datasets was cancelled.');
    const completed = completeDataset(data, imp, k);
    fits.push(fit(keep ? subsetRows(completed, keep) : completed, spec, opts));
    hooks.onProgress?.(k + 1, imp.m);
    if (hooks.tick) await hooks.tick();
  }
  if (hooks.signal?.aborted) throw new FulcraError('cancelled', 'Fitting the imputed datasets was cancelled.');
  const pooled = poolCoefficients(fits, opts.level ?? fits[0].level);
  const warnings: EngineWarning[] = [...imp.warnings];
  const seen = new Map<string, { w: EngineWarning; count: number }>();
  for (const f of fits)
    for (const w of f.warnings) {
      const key = `${w.code}\u0000${w.message}`;
      const s = seen.get(key);
      if (s) s.count++;
      else seen.set(key, { w, count: 1 });
    }
  for (const { w, count } of seen.values())
    warnings.push({ ...w, message: `${w.message} (in ${count} of ${imp.m} imputed datasets)` });
  const notConverged = fits.filter((f) => !f.converged).length;
  if (notConverged > 0 && !fits.some((f) => f.warnings.some((w) => w.code === 'not-converged')))
    warnings.push(
      warning(
        'mi-fit-not-converged',
        `The model fit did not converge in ${notConverged} of ${imp.m} imputed datasets.`,
        'Raise the iteration limit, or use Firth fitting if a term separates the outcome.',
      ),
    );
  warnings.push(...pooled.warnings);
  const imputedRows = new Set<number>();
  for (const c of imp.imputed) for (const i of c.rows) imputedRows.add(i);
  return {
    ...pooled,
    warnings,
    method: fits[0].method as FitOptions['method'],
    nRows: data.nRows,
    nImputedRows: imputedRows.size,
    nExcluded: keep ? data.nRows - keep.length : 0,
    events: fits.reduce((s, f) => s + f.events, 0) / imp.m,
    nonEvents: fits.reduce((s, f) => s + f.nonEvents, 0) / imp.m,
    notConverged,
  };
}

function keptRows(n: number, drop: Int32Array): Int32Array {
  const out = new Uint8Array(n).fill(1);
  for (const i of drop) out[i] = 0;
  const rows: number[] = [];
  for (let i = 0; i < n; i++) if (out[i]) rows.push(i);
  return Int32Array.from(rows);
}

function subsetRows(data: Dataset, rows: Int32Array): Dataset {
  return {
    nRows: rows.length,
    firstRow: sheetRow(data, rows[0] ?? 0),
    rowNumbers: Int32Array.from(rows, (i) => sheetRow(data, i)),
    columns: data.columns.map((c) =>
      c.kind === 'numeric'
        ? { ...c, values: Float64Array.from(rows, (i) => c.values[i]) }
        : { ...c, codes: Int32Array.from(rows, (i) => c.codes[i]) },
    ),
  };
}
