/** The PDF's words for how the cut-off and the costs came about. */
import type { Costs } from '../engine/core';
import { formatPercent, formatPlain } from './format';

export interface CutoffRuleInput {
  /** How the page says the cut-off was set. */
  how: 'cost-based' | 'cheapest' | 'hand' | 'restored';
  threshold: number;
  costs: Costs;
  /** The cost-based cut-off C_FA / (C_FA + C_MC) and the cheapest cut-off on the data (null: flag nobody). */
  costBased: number;
  cheapest: number | null;
}

const same = (a: number | null, b: number) => a !== null && Math.abs(a - b) <= 1e-9;

/**
 * "cost-based: 1/(1 + 5) = 16.7%", "cheapest observed cut-off …" or "set by hand on the page at 12.0%". A claim
 * the numbers do not bear out (the cut-off is not where the rule puts it) is reported as a cut-off set by hand;
 * a cut-off restored from a workspace is named by the rule it matches, if any.
 */
export function cutoffRuleText(r: CutoffRuleInput): string {
  const at = formatPercent(r.threshold, 1);
  const fa = formatPlain(r.costs.falseAlarm);
  const costBased =
    `cost-based: ${fa}/(${fa} + ${formatPlain(r.costs.missedCase)}) = ${formatPercent(r.costBased, 1)}, ` +
    'the cut-off with the lowest expected cost when the predicted risks are calibrated';
  const cheapest = `cheapest observed cut-off: ${at} gave the lowest expected cost on these data`;
  const isCostBased = same(r.costBased, r.threshold);
  const isCheapest = same(r.cheapest, r.threshold);
  if (r.how === 'cost-based' && isCostBased) return costBased;
  if (r.how === 'cheapest' && isCheapest) return cheapest;
  if (r.how === 'restored') {
    if (isCostBased) return costBased;
    if (isCheapest) return cheapest;
    return `restored from a saved workspace at ${at}`;
  }
  return `set by hand on the page at ${at}`;
}

/** The costs in words, saying when they are the default and nobody set them. */
export function costsText(costs: Costs, setByUser: boolean): string {
  const ratio = `${formatPlain(costs.missedCase / costs.falseAlarm, 3)} : 1`;
  const parts =
    `missed event (false negative) ${formatPlain(costs.missedCase, 4)}; ` +
    `false alarm (false positive) ${formatPlain(costs.falseAlarm, 4)}`;
  return setByUser ? `${parts}; ratio ${ratio}` : `the default ${ratio}, not set by the user (${parts})`;
}
