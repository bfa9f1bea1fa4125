import type { Costs } from '../core/costs';
import { costPer100, FLAG_RULE } from '../evaluation/threshold';
import type { FlagTable, Reclassification } from './types';

/** Shown beside every NRI: what it is, and how it is misread. */
export const NRI_CAUTION =
  'The net reclassification improvement is easily misread. It is not a proportion of patients: it adds a ' +
  'fraction of events to a fraction of non-events, so a value of 0.1 does not mean 10% of patients are better ' +
  'classified. It weighs a missed case and a false alarm alike whatever they cost, and with one cut-off it is ' +
  'only the change in sensitivity plus the change in specificity, best read as those two numbers apart (Kerr ' +
  'et al. 2014, Epidemiology 25:114). Testing it adds nothing to the test of the added terms in the model ' +
  '(Pepe et al. 2013, Stat Med 32:1467), so no p-value is given; read it with the net benefit and the expected cost.';

function emptyTable(): FlagTable {
  return { both: 0, aOnly: 0, bOnly: 0, neither: 0, total: 0 };
}

function add(t: FlagTable, fa: boolean, fb: boolean): void {
  t.total++;
  if (fa && fb) t.both++;
  else if (fa) t.aOnly++;
  else if (fb) t.bOnly++;
  else t.neither++;
}

/**
 * Reclassification at one cut-off (flag rule: risk ≥ cut-off) of two models' risks on the same cases (riskB[k]
 * is the same case as riskA[k]): who is flagged by a only, b only, both, neither, among events, non-events and
 * all; the categorical net reclassification improvement of Pencina, D'Agostino Sr, D'Agostino Jr & Vasan (2008,
 * Stat Med 27:157) with two categories, and with costs the expected cost per 100 cases of each.
 */
export function reclassification(
  y: Float64Array,
  riskA: Float64Array,
  riskB: Float64Array,
  threshold: number,
  thresholdSource: 'given' | 'costs',
  costs: Costs | null,
): Reclassification {
  const events = emptyTable();
  const nonEvents = emptyTable();
  const all = emptyTable();
  for (let i = 0; i < y.length; i++) {
    const fa = riskA[i] >= threshold;
    const fb = riskB[i] >= threshold;
    add(y[i] === 1 ? events : nonEvents, fa, fb);
    add(all, fa, fb);
  }
  const eventNri = events.total > 0 ? (events.bOnly - events.aOnly) / events.total : null;
  const nonEventNri = nonEvents.total > 0 ? (nonEvents.aOnly - nonEvents.bOnly) / nonEvents.total : null;
  let cost: Reclassification['costPer100'] = null;
  if (costs && all.total > 0) {
    const conf = (model: 'a' | 'b') => {
      const tp = events.both + (model === 'a' ? events.aOnly : events.bOnly);
      const fp = nonEvents.both + (model === 'a' ? nonEvents.aOnly : nonEvents.bOnly);
      return { tp, fp, fn: events.total - tp };
    };
    const a = costPer100(conf('a'), all.total, costs);
    const b = costPer100(conf('b'), all.total, costs);
    cost = { a, b, difference: b - a };
  }
  return {
    threshold,
    thresholdSource,
    flagRule: FLAG_RULE,
    events,
    nonEvents,
    all,
    eventNri,
    nonEventNri,
    nri: eventNri === null || nonEventNri === null ? null : eventNri + nonEventNri,
    costPer100: cost,
    caution: NRI_CAUTION,
  };
}
