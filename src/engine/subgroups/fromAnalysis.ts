import type { Dataset } from '../core/data';
import { subgroupsFromColumn } from './groups';
import { subgroupPerformance, type SubgroupOptions } from './performance';
import type { SubgroupPerformance, SubgroupSpec } from './types';

/** The per-row predictions an analysis keeps (`ApparentScores` of workflow/runAnalysis has these fields). */
export interface UsedRowScores {
  y: Float64Array;
  risk: Float64Array;
  eta: Float64Array;
  /** Index into the dataset of each used row. */
  rowsUsed: Int32Array;
}

/**
 * Subgroup performance of an analysed model in one call: groups from `spec.column` of `data` for the analysis's
 * used rows, then `subgroupPerformance` with the analysis's level and cut-off.
 */
export function subgroupsOfAnalysis(
  data: Dataset,
  scores: UsedRowScores,
  spec: SubgroupSpec,
  options: SubgroupOptions = {},
): SubgroupPerformance {
  const groups = subgroupsFromColumn(data, spec, scores.rowsUsed);
  return subgroupPerformance({ y: scores.y, risk: scores.risk, eta: scores.eta }, groups, options);
}
