import type { Dataset, FitResult } from '../engine/core';
import { POOL_MIN_ROWS, rowPoolThreads, rowShards } from '../engine/numerics';
import { runAnalysis, type FitStep } from '../engine/workflow';
import { select } from '../io/numericSummary';
import { checkFitBudget } from './budget';
import { toView } from './performance';
import type { FitRequest, FitView, OddsRow } from './protocol';
import { requireData, tick, type Session } from './session';

type Hooks = { onProgress?: (d: number, t: number) => void; signal?: { aborted: boolean } };

/**
 * Runs the engine's one analysis (src/engine/workflow) on the loaded data, keeps its record and apparent
 * risks in the session (for the cut-off queries, the PDF and analysisRecord()), and shapes the page's view.
 * `fitted`: the model this request gave before (a restarted engine gets it back instead of fitting again).
 */
export async function fitModel(s: Session, req: FitRequest, hooks: Hooks, fitted?: FitStep): Promise<FitView> {
  const data = requireData(s);
  checkFitBudget(data, req.spec);
  const { record, scores, diagnostics } = await runAnalysis(data, req, { ...hooks, tick }, undefined, fitted);
  s.record = record;
  s.diagnostics = { fit: record.fit, rows: diagnostics };
  s.y = scores.y;
  s.risk = scores.risk;
  s.prepared = scores.prepared;
  s.imputed = null;
  const n = scores.y.length;
  return {
    request: record.request,
    fit: record.fit,
    rows: oddsRows(s, record.fit),
    lambda: record.lambda,
    performance: toView(record.evaluation),
    sampleSize: {
      lines: record.sampleSize?.summary ?? [record.sampleSizeNote ?? ''],
      warnings: record.sampleSize?.warnings ?? [],
    },
    typical: typicalValues(data, record.fit, scores.rowsUsed),
    rowsUsed: n,
    threads: n >= POOL_MIN_ROWS ? rowPoolThreads() : 1,
    inferenceThreads: shardThreadsOf(record.fit, n),
    layout: record.layout ?? null,
    warnings: record.warnings,
  };
}

function oddsRows(s: Session, f: FitResult): OddsRow[] {
  const truth = s.summary?.truth ?? null;
  const truthOf = (name: string): number | null => {
    if (!truth) return null;
    if (name === '(Intercept)') return truth.find((t) => t.column === null)?.value ?? null;
    const hit = truth.find(
      (t) => t.column !== null && (t.level === undefined ? name === t.column : name === `${t.column}=${t.level}`),
    );
    return hit ? hit.value : null;
  };
  return f.coefficients.map((c) => ({
    name: c.name,
    term: c.term,
    estimate: c.estimate,
    oddsRatio: c.oddsRatio,
    se: c.se,
    p: c.p,
    waldLower: c.waldLower,
    waldUpper: c.waldUpper,
    profileLower: c.profileLower,
    profileUpper: c.profileUpper,
    aliased: c.aliased,
    truth: truthOf(c.name),
  }));
}

/** Median of each numeric predictor and the reference level of each categorical one, over the rows used. */
function typicalValues(data: Dataset, f: FitResult, rows: Int32Array): Record<string, string | number> {
  const out: Record<string, string | number> = {};
  let v = new Float64Array(0); // one scratch buffer for every column
  for (const t of f.recipe.terms) {
    if (t.type === 'interaction') continue;
    if (t.type === 'categorical') {
      out[t.column] = t.reference;
      continue;
    }
    const col = data.columns.find((c) => c.name === t.column);
    if (!col || col.kind !== 'numeric') continue;
    // The lower median (an observed value) by selection: O(n), where sorting 10⁶ values takes ~0.4 s.
    if (v.length < rows.length) v = new Float64Array(rows.length);
    for (let i = 0; i < rows.length; i++) v[i] = col.values[rows[i]];
    out[t.column] = rows.length ? select(v.subarray(0, rows.length), Math.floor((rows.length - 1) / 2)) : NaN;
  }
  return out;
}

/** Threads the shard helpers gave this fit's profile limits and term tests (rowShards.ts use: ML, ≥ POOL_MIN_ROWS). */
function shardThreadsOf(f: FitResult, n: number): number {
  const shards = rowShards();
  if (!shards || n < POOL_MIN_ROWS || f.method !== 'ml' || f.covariance === null) return 1;
  const solved = f.coefficients.some((c) => c.profileLower !== null) || f.terms.some((t) => t.lrChi2 !== null);
  return solved ? shards.threads : 1;
}
