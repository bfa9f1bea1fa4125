import { fitImputed } from '../engine/imputation';
import { mice } from '../engine/imputation';
import { resolveRequest } from '../engine/workflow';
import type { FitRequest, ImputedView } from './protocol';
import { requireData, tick, type Session } from './session';

type Hooks = { onProgress?: (d: number, t: number) => void; signal?: { aborted: boolean } };

/**
 * Multiple imputation by chained equations (m = 10, 10 iterations, seed 1) of the model's columns, the model
 * fitted on each completed dataset and pooled by Rubin's rules (standard or Firth fits only).
 */
export async function fitWithImputation(s: Session, req: FitRequest, hooks: Hooks): Promise<ImputedView> {
  const data = requireData(s);
  const method = req.method === 'firth' ? 'firth' : 'ml';
  const imp = await mice(data, req.spec, { m: 10, maxit: 10, seed: 1 }, { ...hooks, tick });
  const { level, maxIter } = resolveRequest(req);
  const options = { method, level, maxIter } as const;
  const pooled = await fitImputed(data, req.spec, imp, options, { signal: hooks.signal, tick });
  const view: ImputedView = {
    m: pooled.m,
    level: pooled.level,
    nRows: pooled.nRows,
    nImputedRows: pooled.nImputedRows,
    imputedColumns: imp.imputed.map((c) => ({ column: c.column, cells: c.rows.length, method: c.method })),
    rows: pooled.coefficients.map((c) => ({
      name: c.name,
      estimate: c.estimate,
      oddsRatio: c.oddsRatio,
      lower: c.waldLower,
      upper: c.waldUpper,
      p: c.p,
      fmi: c.fmi,
      df: c.df,
    })),
    warnings: pooled.warnings,
  };
  // Kept for the PDF only when it belongs to the current model (same request as the last fit).
  const same = s.record && JSON.stringify(s.record.request) === JSON.stringify(resolveRequest(req));
  s.imputed = same ? view : null;
  return view;
}
