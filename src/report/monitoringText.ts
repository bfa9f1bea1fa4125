import type { CusumChart, UnscoredReason } from '../engine/monitoring';
import { formatCount, formatFixed } from './format';

/**
 * Why a monitoring row could not be scored, in the words the page and the PDF both use. Kept apart from the PDF
 * section so the page can import it without pulling jsPDF and the embedded fonts into the page bundle.
 */
export const UNSCORED_REASON_TEXT: Readonly<Record<UnscoredReason, string>> = {
  'missing-value': 'a predictor is missing',
  'unknown-category': 'a category the model was not fitted with',
  'missing-outcome': 'the outcome is missing',
  'missing-date': 'the date is missing or not a date',
  'missing-unit': 'the unit is missing',
};

const FLAG_TEXT: Record<string, string> = {
  'above-outer': 'above the outer limit',
  'above-inner': 'above the inner limit',
  within: 'within the limits',
  'below-inner': 'below the inner limit',
  'below-outer': 'below the outer limit',
};

/** A short description of a flag (page and PDF). */
export const funnelFlagText = (flag: string): string => FLAG_TEXT[flag] ?? flag;

/** The run-length line of one chart: target, Markov chain, simulation (page and PDF). */
export function arlText(c: CusumChart): string {
  const s = c.arl0Simulated;
  return (
    `h = ${formatFixed(c.h, 3)} for an in-control average run length of ${formatCount(c.targetArl0)} cases; ` +
    `achieved ${formatCount(c.arl0Markov)} by the Markov chain (${c.markovStates} states), ` +
    `${formatCount(s.mean)} \u00b1 ${formatCount(s.se)} by ${formatCount(s.runs)} simulated runs (seed ${s.seed}` +
    `${s.censored > 0 ? `, ${s.censored} stopped without a signal` : ''})`
  );
}
