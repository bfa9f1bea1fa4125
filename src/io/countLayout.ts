import type { Dataset, OutcomeLayout } from '../engine/core';

/** A proposed table-of-counts layout: the events column and the trials or non-events column, with the reason. */
export type CountLayoutProposal = {
  events: string;
  layout: Exclude<OutcomeLayout, { kind: 'binary' }>;
  hint: string;
};

const EVENT_WORDS = /(event|case|infect|fail|death|died|readmi|complic|positive|defect|ssi|yes|numerator)/i;
const TRIAL_WORDS = /(trial|total|operation|procedure|patients|admission|count|denominator|^n$|^n_|_n$|tested|units)/i;
const NON_EVENT_WORDS = /(non.?event|control|no.?event|without|negative|surviv|ok$|passed|^no_)/i;

/** At most this many count columns are paired (the check is pairwise over rows). */
const MAX_COUNT_COLUMNS = 24;

/**
 * Proposes a table-of-counts layout after a load, or null. Count columns are numeric columns whose values are all
 * whole numbers ≥ 0 with at least one above 1 (so 0/1 outcomes are not counts). A pair (events, trials) fits when
 * the first never exceeds the second in a row where both are present (and is below it somewhere); it is proposed
 * when the column names say which pair it is (events / trials, events / non-events), otherwise null (the user
 * chooses under Roles). Every row is checked again, with a message naming the row, when the model is fitted.
 */
export function proposeCountLayout(data: Dataset): CountLayoutProposal | null {
  const counts = data.columns.filter(
    (c): c is Extract<typeof c, { kind: 'numeric' }> => c.kind === 'numeric' && isCountColumn(c.values),
  );
  if (counts.length < 2 || counts.length > MAX_COUNT_COLUMNS) return null;
  // events / non-events is told by the names only: any two counts could be that
  const byName = counts.filter((c) => EVENT_WORDS.test(c.name));
  const nonEv = counts.filter((c) => NON_EVENT_WORDS.test(c.name));
  if (byName.length === 1 && nonEv.length === 1 && byName[0] !== nonEv[0]) {
    return {
      events: byName[0].name,
      layout: { kind: 'events-nonevents', nonEvents: nonEv[0].name },
      hint:
        `The table looks like counts: "${byName[0].name}" events and "${nonEv[0].name}" non-events per row, so the ` +
        'outcome layout is set to events and non-events. Check it under Roles.',
    };
  }
  const pairs: [string, string][] = [];
  for (const a of counts)
    for (const b of counts) {
      if (a === b) continue;
      let fits = true;
      let some = false;
      for (let i = 0; i < data.nRows; i++) {
        const x = a.values[i],
          y = b.values[i];
        if (Number.isNaN(x) || Number.isNaN(y)) continue;
        if (x > y) {
          fits = false;
          break;
        }
        if (x < y) some = true;
      }
      if (fits && some) pairs.push([a.name, b.name]);
    }
  // Two whole-number columns where one never exceeds the other also occur in case-level files (parity and age):
  // a pair is proposed only when a name reads as events or trials.
  const both = pairs.filter(([e, n]) => EVENT_WORDS.test(e) && TRIAL_WORDS.test(n));
  const either = pairs.filter(([e, n]) => EVENT_WORDS.test(e) || TRIAL_WORDS.test(n));
  const pick = both.length === 1 ? both[0] : either.length === 1 ? either[0] : null;
  if (!pick) return null;
  return {
    events: pick[0],
    layout: { kind: 'events-trials', trials: pick[1] },
    hint:
      `The table looks like counts: "${pick[0]}" is never above "${pick[1]}", so the outcome layout is set to ` +
      `${pick[0]} events out of ${pick[1]} trials per row. Check it under Roles.`,
  };
}

function isCountColumn(v: Float64Array): boolean {
  let above1 = false;
  let any = false;
  for (let i = 0; i < v.length; i++) {
    const x = v[i];
    if (Number.isNaN(x)) continue;
    if (!(Number.isInteger(x) && x >= 0)) return false;
    any = true;
    if (x > 1) above1 = true;
  }
  return any && above1;
}
