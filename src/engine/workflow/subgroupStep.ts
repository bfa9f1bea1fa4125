import { FulcraError, type Dataset } from '../core/data';
import { linearPredictorFromRecipe } from '../design/design';
import { sigmoid } from '../numerics/loss';
import { subgroupsOfAnalysis, type SubgroupPerformance } from '../subgroups';
import type { AnalysisRecord, ApparentScores } from './analyse';
import { analysedRows } from './analyse';

/** The user's choice of subgroups: a column and, for a numeric column, optional cut points (bands). */
export interface SubgroupChoice {
  column: string;
  /** Strictly increasing cut points of a numeric column; absent or empty: one group per level / value. */
  cutPoints?: number[];
  /**
   * The cut-off for sensitivity, specificity and the fraction flagged (risk ≥ cut-off). Absent: the request's
   * cut-off (`--threshold`), else none; null: none.
   */
  threshold?: number | null;
}

/** The per-row predictions subgroupStep reads (ApparentScores without the threshold structure). */
export type SubgroupStepScores = Pick<ApparentScores, 'y' | 'weights' | 'eta' | 'risk' | 'rowsUsed'>;

/** A weighted analysis is written out to at most this many cases for its subgroups. */
export const SUBGROUP_MAX_CASES = 5_000_000;

/**
 * The scores of a weighted analysis (grouped table, frequency weights) written out one row per case: each row
 * repeated by its weight, with its data row index, so every subgroup measure counts cases, equal to the data written
 * out one row per case. Unweighted scores are returned as they are.
 */
export function casesOfScores(scores: SubgroupStepScores): SubgroupStepScores {
  const w = scores.weights;
  if (!w) return scores;
  let total = 0;
  for (let i = 0; i < w.length; i++) total += w[i];
  if (total > SUBGROUP_MAX_CASES)
    throw new FulcraError(
      'subgroups-too-many-cases',
      `The table stands for ${total.toLocaleString('en')} cases; subgroup performance writes them out one per case ` +
        `and takes at most ${SUBGROUP_MAX_CASES.toLocaleString('en')}.`,
      'Fit a part of the table (fewer periods or units) to see performance by subgroup.',
    );
  const y = new Float64Array(total),
    eta = new Float64Array(total),
    risk = new Float64Array(total),
    rowsUsed = new Int32Array(total);
  let k = 0;
  for (let i = 0; i < w.length; i++) {
    const end = k + w[i];
    y.fill(scores.y[i], k, end);
    eta.fill(scores.eta[i], k, end);
    risk.fill(scores.risk[i], k, end);
    rowsUsed.fill(scores.rowsUsed[i], k, end);
    k = end;
  }
  return { y, weights: null, eta, risk, rowsUsed };
}

/**
 * Subgroup performance of an analysed model (issue 16), the one record that the page, the PDF and
 * `npm run fit -- --subgroups COL` show: the groups of `choice.column` among the analysis's used rows (levels,
 * values, or bands at `choice.cutPoints`), then per group n, events, O/E with its exact interval, AUC with the
 * DeLong interval, calibration-in-the-large and slope, and sensitivity / specificity / fraction flagged at the
 * cut-off, with the too-small rule (engine/subgroups). The confidence level is the analysis's.
 * An analysis of a grouped table or with frequency weights counts cases: its rows are written out one per case
 * (casesOfScores), so n, events and every measure are those of the cases.
 */
export function subgroupStep(
  data: Dataset,
  record: AnalysisRecord,
  given: SubgroupStepScores,
  choice: SubgroupChoice,
): SubgroupPerformance {
  const scores = casesOfScores(given);
  const n = scores.rowsUsed.length;
  if (scores.y.length !== n || scores.risk.length !== n || scores.eta.length !== n)
    throw new FulcraError(
      'bad-scores',
      `The scores hold ${scores.y.length} outcomes for ${n} used rows.`,
      'Pass the scores of this same analysis.',
    );
  const threshold = choice.threshold === undefined ? record.request.threshold : choice.threshold;
  return subgroupsOfAnalysis(
    data,
    scores,
    { column: choice.column, cutPoints: choice.cutPoints ?? [] },
    { level: record.request.level, threshold },
  );
}

/**
 * The apparent per-row scores of an analysis, rebuilt from its record and the data it ran on (for a caller that
 * kept the record but not the arrays): the same rows, the same order and the same numbers as runAnalysis's
 * `scores` (left-out rows and grouped tables mapped back to `data`'s row indices).
 */
export function scoresOfAnalysis(data: Dataset, record: AnalysisRecord): SubgroupStepScores {
  const rows = analysedRows(data, record.request);
  const d = linearPredictorFromRecipe(
    record.fit.recipe,
    record.fit.coefficients.map((c) => c.estimate),
    rows.data,
  );
  if (!d.y) throw new FulcraError('no-outcome', `The outcome column "${record.fit.recipe.outcome}" is missing.`);
  const index = rows.index;
  return {
    y: d.y,
    weights: d.weights,
    eta: d.eta,
    risk: d.eta.map(sigmoid),
    rowsUsed: index ? d.rowsUsed.map((i) => index[i]) : d.rowsUsed,
  };
}
