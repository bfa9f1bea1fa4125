import { warning, type EngineWarning } from '../core/warnings';
import type { SubgroupPrecision, SubgroupSizeRule } from './types';

/** At least this many events and this many non-events for a validation sample (Collins, Ogundimu & Altman 2016). */
export const IMPRECISE_BELOW = 100;
/** Below this many events or non-events, AUC and calibration are not computed (common practice, no source). */
export const COUNTS_ONLY_BELOW = 10;

const IMPRECISE_SOURCE =
  'Collins, Ogundimu & Altman 2016, Stat Med 35:214 (a validation sample needs at least 100 events and ' +
  '100 non-events for precise estimates of discrimination and calibration)';
const COUNTS_ONLY_SOURCE =
  'common practice (no published source): with fewer than 10 of a class, AUC and calibration estimates are ' +
  'too unstable to report';

/** The too-small rule as the record states it. */
export function subgroupSizeRule(): SubgroupSizeRule {
  return {
    impreciseBelow: IMPRECISE_BELOW,
    impreciseSource: IMPRECISE_SOURCE,
    countsOnlyBelow: COUNTS_ONLY_BELOW,
    countsOnlySource: COUNTS_ONLY_SOURCE,
    text:
      `A group with no events or no non-events gets counts, O/E and the cut-off counts only. A group with fewer than ` +
      `${COUNTS_ONLY_BELOW} events or non-events gets counts, O/E and the cut-off counts, but no AUC or ` +
      `calibration (${COUNTS_ONLY_SOURCE}). A group with fewer than ${IMPRECISE_BELOW} events or non-events gets ` +
      `every measure, marked imprecise (${IMPRECISE_SOURCE}).`,
  };
}

/** What the rule says of a group with these counts. */
export function subgroupPrecision(events: number, nonEvents: number): SubgroupPrecision {
  const fewer = Math.min(events, nonEvents);
  if (fewer === 0) return 'one-class';
  if (fewer < COUNTS_ONLY_BELOW) return 'counts-only';
  return fewer < IMPRECISE_BELOW ? 'imprecise' : 'adequate';
}

const classes = (events: number, nonEvents: number) =>
  `${events} event${events === 1 ? '' : 's'} and ${nonEvents} non-event${nonEvents === 1 ? '' : 's'}`;

/** Why AUC and calibration are missing for a group, or null when they are computed. */
export function notComputedReason(precision: SubgroupPrecision, events: number, nonEvents: number): string | null {
  if (precision === 'one-class')
    return (
      `The group has ${events === 0 ? 'no events' : 'no non-events'}: the AUC compares events with non-events ` +
      `and calibration needs both, so only counts, O/E and the cut-off counts are given (` +
      `${events === 0 ? 'sensitivity' : 'specificity'} is undefined).`
    );
  if (precision === 'counts-only')
    return (
      `The group has only ${classes(events, nonEvents)}, fewer than ${COUNTS_ONLY_BELOW} of a class ` +
      `(${COUNTS_ONLY_SOURCE}); AUC and calibration are not computed.`
    );
  return null;
}

/** The coded warning of a small group (null for an adequate group), naming the column and the group. */
export function subgroupSizeWarning(
  column: string,
  label: string,
  precision: SubgroupPrecision,
  events: number,
  nonEvents: number,
): EngineWarning | null {
  const group = `Subgroup "${label}" of column "${column}"`;
  if (precision === 'one-class')
    return warning(
      'subgroup-one-class',
      `${group} has ${classes(events, nonEvents)}: with one outcome class there is no AUC and no calibration ` +
        `intercept or slope; only counts, O/E and the cut-off counts are given.`,
      'Merge it with a neighbouring group (other cut points or categories) or report its counts only.',
      [column],
    );
  if (precision === 'counts-only')
    return warning(
      'subgroup-too-small',
      `${group} has only ${classes(events, nonEvents)}, fewer than ${COUNTS_ONLY_BELOW} of a class ` +
        `(${COUNTS_ONLY_SOURCE}): AUC and calibration are not computed; counts, O/E and the cut-off counts are.`,
      'Merge it with a neighbouring group (other cut points or categories) to say anything about discrimination ' +
        'or calibration.',
      [column],
    );
  if (precision === 'imprecise')
    return warning(
      'subgroup-imprecise',
      `${group} has ${classes(events, nonEvents)}, fewer than the ${IMPRECISE_BELOW} of each recommended for ` +
        `validation (${IMPRECISE_SOURCE}): its estimates are shown but imprecise; read the intervals, not the ` +
        `point estimates.`,
      'Do not conclude that the model works differently in this group from its point estimates alone.',
      [column],
    );
  return null;
}
