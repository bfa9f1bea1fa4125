import { predict, predictOne } from '../engine/fitting';
import { predictionsCsv } from '../io/export/predictionsCsv';
import type { ImportResult } from '../io/types';
import type { BatchScoreView, ScoreView } from './protocol';
import { requireFit, type Session } from './session';

/** Risk of one case entered in the form, with its CI and whether it is flagged (risk ≥ cut-off). */
export function scoreOne(s: Session, values: Record<string, string | number | null>, threshold: number): ScoreView {
  const r = predictOne(requireFit(s), values);
  return { ...r, flagged: r.risk >= threshold, threshold };
}

/** Scores every complete row of an imported file; rows with a missing predictor are skipped and counted. */
export function scoreImported(s: Session, imported: ImportResult, threshold: number): BatchScoreView {
  const r = predict(requireFit(s), imported.dataset);
  const srcRow = (i: number) => imported.sourceRows[r.rowsUsed[i]];
  const f = requireFit(s);
  const hasCi = r.lower.some((x) => !Number.isNaN(x));
  const csv = predictionsCsv(
    imported.dataset,
    { risk: r.risk, lower: hasCi ? r.lower : null, upper: hasCi ? r.upper : null, rowsUsed: r.rowsUsed },
    { threshold, level: f.level },
  );
  const n = imported.dataset.nRows;
  return {
    n,
    scored: r.risk.length,
    skipped: n - r.risk.length,
    preview: Array.from({ length: Math.min(20, r.risk.length) }, (_, i) => ({
      row: srcRow(i),
      risk: r.risk[i],
      lower: r.lower[i],
      upper: r.upper[i],
    })),
    csv,
    warnings: [...imported.warnings, ...r.warnings],
  };
}
