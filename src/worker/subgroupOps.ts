import { FulcraError } from '../engine/core';
import type { SubgroupPerformance } from '../engine/subgroups';
import { scoresOfAnalysis, subgroupStep, type SubgroupChoice, type SubgroupStepScores } from '../engine/workflow';
import type { FitResult } from '../engine/core';
import { requireData, requireRecord, type Session } from './session';

/** The last subgroup choice of a session and the fit it was made on (the PDF repeats it for that fit only). */
const chosen = new WeakMap<Session, { fit: FitResult; choice: SubgroupChoice; scores: SubgroupStepScores }>();

/** The subgroup choice of the page, or the engine's reason it cannot be computed (shown beside the inputs). */
export type SubgroupAnswer =
  | { ok: true; choice: SubgroupChoice; performance: SubgroupPerformance }
  | { ok: false; choice: SubgroupChoice; problem: { code: string; message: string; suggestion: string } };

/** Engine refusals the page shows beside the column and cut-point inputs rather than as a notice. */
const INLINE = new Set([
  'bad-cut-points',
  'too-many-subgroups',
  'subgroups-weighted',
  'unknown-column',
  'bad-max-groups',
  'bad-threshold',
]);

function scoresFor(s: Session): SubgroupStepScores {
  const record = requireRecord(s);
  const held = chosen.get(s);
  return held && held.fit === record.fit ? held.scores : scoresOfAnalysis(requireData(s), record);
}

/**
 * Subgroup performance of the current fit for the page's choice (column, cut points, the page's cut-off): the one
 * record of workflow/subgroupStep. The choice is kept for the PDF of this fit. Refusals the user fixes in the
 * inputs (bad cut points, too many groups, a weighted model) come back as `problem`, other errors are thrown.
 */
export function subgroupsView(s: Session, choice: SubgroupChoice): SubgroupAnswer {
  const record = requireRecord(s);
  const data = requireData(s);
  const scores = scoresFor(s);
  try {
    const performance = subgroupStep(data, record, scores, choice);
    chosen.set(s, { fit: record.fit, choice, scores });
    return { ok: true, choice, performance };
  } catch (e) {
    const err = e as FulcraError;
    if (!(err instanceof FulcraError) || !INLINE.has(err.code)) throw e;
    return { ok: false, choice, problem: { code: err.code, message: err.message, suggestion: err.suggestion ?? '' } };
  }
}

/** The choice last computed for the current fit (the page restores its inputs from it), or null. */
export function subgroupChoiceOf(s: Session): SubgroupChoice | null {
  const held = chosen.get(s);
  return held && s.record && held.fit === s.record.fit ? held.choice : null;
}

/** Subgroup performance for the PDF at the report's cut-off, when subgroups were computed for the current fit. */
export function subgroupsForReport(s: Session, threshold: number): SubgroupPerformance | undefined {
  const held = chosen.get(s);
  const record = s.record;
  if (!held || !record || held.fit !== record.fit || !s.data) return undefined;
  return subgroupStep(s.data, record, held.scores, { ...held.choice, threshold });
}
