import type { Column } from '../engine/core';

export type OutcomeProposal =
  | { status: 'proposed'; event: string; nonEvent: string; reason: string }
  | { status: 'needsChoice'; levels: string[]; reason: string }
  | { status: 'unsuitable'; levels: string[]; reason: string };

/** Event / non-event pairs recognised without asking (lower case; common practice in clinical and QA data). */
const PAIRS: readonly [string, string][] = [
  ['yes', 'no'],
  ['y', 'n'],
  ['true', 'false'],
  ['t', 'f'],
  ['1', '0'],
  ['positive', 'negative'],
  ['pos', 'neg'],
  ['+', '-'],
  ['present', 'absent'],
  ['infected', 'not infected'],
  ['infection', 'no infection'],
  ['case', 'control'],
  ['event', 'no event'],
  ['dead', 'alive'],
  ['died', 'survived'],
  ['deceased', 'alive'],
  ['fail', 'pass'],
  ['failed', 'passed'],
  ['abnormal', 'normal'],
  ['detected', 'not detected'],
  ['reactive', 'non-reactive'],
];
/** "not X" / "no X" / "without X" against "X". Hyphenated compounds such as "non-union" are left to the user:
 * there the negated word is itself the adverse event. */
const NEGATION = /^(not|no|without)\s+(.+)$/;

function presentLevels(col: Column): string[] {
  if (col.kind === 'categorical') {
    const seen = new Uint8Array(col.levels.length);
    for (let i = 0; i < col.codes.length; i++) if (col.codes[i] >= 0) seen[col.codes[i]] = 1;
    return col.levels.filter((_, k) => seen[k] === 1);
  }
  const vals = new Set<number>();
  for (let i = 0; i < col.values.length && vals.size <= 10; i++)
    if (!Number.isNaN(col.values[i])) vals.add(col.values[i]);
  return [...vals].sort((a, b) => a - b).map(String);
}

/**
 * Proposes which outcome value is the event. Two values forming a known pair (yes/no, 1/0, true/false,
 * Y/N, positive/negative, infected/not infected, "X"/"no X"…, case-insensitive) → `proposed`;
 * two other values or more than two → `needsChoice` with the values; one value, none, or a numeric
 * column with many values → `unsuitable`. A numeric 0/1 column proposes "1" (ModelSpec's convention).
 */
export function proposeOutcomeEvent(column: Column): OutcomeProposal {
  const levels = presentLevels(column);
  const q = `"${column.name}"`;
  if (levels.length === 0)
    return { status: 'unsuitable', levels, reason: `${q} has no values; every cell is missing.` };
  if (levels.length === 1) {
    return {
      status: 'unsuitable',
      levels,
      reason: `Every present row of ${q} is "${levels[0]}"; an outcome needs rows with and without the event.`,
    };
  }
  if (column.kind === 'numeric' && levels.length > 2) {
    return {
      status: 'unsuitable',
      levels: [],
      reason:
        `${q} is a number with many values; the outcome must be yes/no. ` +
        'Make a yes/no column (e.g. above a cut-off) in the file.',
    };
  }
  if (levels.length > 2) {
    return {
      status: 'needsChoice',
      levels,
      reason:
        `${q} has ${levels.length} values; choose the one that counts as the event ` +
        '(the others count as no event).',
    };
  }
  const [a, b] = levels;
  const la = a.trim().toLowerCase(),
    lb = b.trim().toLowerCase();
  for (const [ev, non] of PAIRS) {
    if (la === ev && lb === non) return proposed(a, b, q);
    if (lb === ev && la === non) return proposed(b, a, q);
  }
  const na = NEGATION.exec(la),
    nb = NEGATION.exec(lb);
  if (na && na[2] === lb) return proposed(b, a, q);
  if (nb && nb[2] === la) return proposed(a, b, q);
  return {
    status: 'needsChoice',
    levels,
    reason: `${q} has two values, "${a}" and "${b}"; choose the one that counts as the event.`,
  };
}

function proposed(event: string, nonEvent: string, q: string): OutcomeProposal {
  return {
    status: 'proposed',
    event,
    nonEvent,
    reason: `${q}: "${event}" is taken as the event and "${nonEvent}" as no event.`,
  };
}

/** A column as the page lists it: its name, the event proposed for it (null: not a recognised yes/no pair). */
export interface OutcomeCandidate {
  name: string;
  proposedEvent: string | null;
  /** False for identifier-like and free-text columns. */
  modelling: boolean;
}

export type OutcomeColumnProposal =
  | { status: 'proposed'; column: string; event: string; hint: string }
  | { status: 'choose'; candidates: string[]; hint: string };

/**
 * Proposes the outcome column after a load: only when exactly ONE column is a plausible yes/no outcome (a
 * modelling column whose two values form a recognised event / no-event pair, see proposeOutcomeEvent). With
 * none or several the choice is left to the user, with a hint naming the candidates.
 */
export function proposeOutcomeColumn(columns: readonly OutcomeCandidate[]): OutcomeColumnProposal {
  const plausible = columns.filter((c) => c.modelling && c.proposedEvent !== null);
  if (plausible.length === 1) {
    const { name, proposedEvent } = plausible[0];
    return {
      status: 'proposed',
      column: name,
      event: proposedEvent!,
      hint:
        `"${name}" is proposed as the outcome, with "${proposedEvent}" as the event: it is the only yes/no ` +
        'column. Check it under Roles.',
    };
  }
  if (plausible.length === 0) {
    return {
      status: 'choose',
      candidates: [],
      hint: 'No column reads as a yes/no outcome (such as yes/no or 1/0); choose the outcome under Roles.',
    };
  }
  const names = plausible.map((c) => `"${c.name}"`);
  const list = names.length > 8 ? `${names.slice(0, 8).join(', ')} and ${names.length - 8} more` : names.join(', ');
  return {
    status: 'choose',
    candidates: plausible.map((c) => c.name),
    hint: `${plausible.length} columns could be the yes/no outcome (${list}); choose the outcome under Roles.`,
  };
}
