/** The comparison's sentences, shared by the page, the PDF section and `npm run fit` (no jsPDF here). */
import type { ModelComparison } from '../engine/comparison';
import { formatFixed, formatInterval, formatP, formatPercent, levelText } from './format';

export const f3 = (x: number | null | undefined) => formatFixed(x ?? null, 3);
export const f4 = (x: number | null | undefined) => formatFixed(x ?? null, 4);
/** "p = 0.002", "p < 0.001". */
const pIs = (p: number | null) => (p !== null && p < 0.001 ? `p ${formatP(p)}` : `p = ${formatP(p)}`);

/** "χ² = 12.34 on 3 df, p = 0.006 …" or why there is no likelihood-ratio test. */
export function lrTestText(c: ModelComparison): string {
  const lr = c.nesting.lrTest;
  if (!lr) return `No likelihood-ratio test: ${c.nesting.lrTestNote ?? 'the models are not nested.'}`;
  const name = (k: 'a' | 'b') => c[k].label;
  return (
    `Likelihood-ratio test of ${name(lr.smaller)} within ${name(lr.larger)} (adds ${lr.addedTerms.join(', ')}): ` +
    `χ² = ${formatFixed(lr.chi2, 2)} on ${lr.df} df, ${pIs(lr.p)}.`
  );
}

/** "AUC 0.712 vs 0.745, difference 0.033 (95% CI …), DeLong paired p = …". */
export function aucDifferenceText(c: ModelComparison): string {
  const d = c.auc.difference;
  return (
    `AUC ${f3(c.auc.a.auc)} (${c.a.label}) and ${f3(c.auc.b.auc)} (${c.b.label}); difference ${f3(d.difference)} ` +
    `(${levelText(c.level)} CI ${formatInterval(d.lower, d.upper, 3)}), paired DeLong test ${pIs(d.p)}.`
  );
}

/**
 * The comparison in a few readable lines (the `npm run fit` summary prints them; the PDF and the page show the
 * same numbers): who was compared on how many rows, nesting and the LR test, AUC, Brier, calibration, the cut-off.
 */
export function comparisonLines(c: ModelComparison): string[] {
  const b = c.brier.difference;
  const cal = (k: 'a' | 'b') =>
    `${c[k].label}: calibration-in-the-large ${f3(c.calibration[k].interceptInTheLarge?.estimate)}, ` +
    `slope ${f3(c.calibration[k].slope?.estimate)}`;
  const lines = [
    `${c.a.label} (${c.a.terms.join(', ')}) and ${c.b.label} (${c.b.terms.join(', ')}) on the same ${c.n} rows ` +
      `(${c.events} events); differences are ${c.b.label} minus ${c.a.label}.`,
    c.nesting.explanation,
    lrTestText(c),
    aucDifferenceText(c),
    `Brier ${f4(c.brier.a.brier)} and ${f4(c.brier.b.brier)}; difference ${f4(b.estimate)} ` +
      `(${levelText(c.level)} CI ${formatInterval(b.lower, b.upper, 4)}), ${pIs(b.p)}.`,
    `${cal('a')}; ${cal('b')}.`,
  ];
  const r = c.reclassification;
  if (r)
    lines.push(
      `At the cut-off ${formatPercent(r.threshold)}: ${r.events.bOnly} events flagged only by ` +
        `${c.b.label}, ${r.events.aOnly} only by ${c.a.label}; ${r.nonEvents.bOnly} non-events flagged only by ` +
        `${c.b.label}, ${r.nonEvents.aOnly} only by ${c.a.label}; NRI ${f3(r.nri)} (events ${f3(r.eventNri)}, ` +
        `non-events ${f3(r.nonEventNri)}; easily misread, see the caution). ${r.flagRule}`,
    );
  return lines;
}
