import type { PredictorComparison } from '../engine/workflow';
import { comparisonLines } from '../report/comparisonText';

/** `--compare-with`: the comparison in a few readable lines (the PDF section's sentences), or why it was not made. */
export function comparisonSummaryLines(c: PredictorComparison): string[] {
  const out = [
    `Comparison with a second model: Model A is the main model, Model B has the predictors ${c.predictors.join(', ')}`,
  ];
  if (c.refittedOnCommonRows) out.push(`  ${c.refittedOnCommonRows.note}`);
  const o = c.outcome;
  if (o.status === 'different-rows') return [...out, `  ${o.message}`, `  ${o.suggestion}`];
  out.push(...comparisonLines(o.comparison).map((l) => `  ${l}`));
  for (const w of o.comparison.warnings) out.push(`  [${w.code}] ${w.message} → ${w.suggestion}`);
  return out;
}
