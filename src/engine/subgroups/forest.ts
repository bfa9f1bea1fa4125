import type { ForestData, ForestRow, SubgroupMeasure, SubgroupPerformance, SubgroupRow } from './types';

const AXIS: Record<SubgroupMeasure, { title: string; reference: number; scale: 'linear' | 'log' }> = {
  observedExpected: { title: 'O/E (observed ÷ expected events)', reference: 1, scale: 'log' },
  auc: { title: 'AUC (area under the ROC curve)', reference: 0.5, scale: 'linear' },
  calibrationInTheLarge: { title: 'Calibration-in-the-large (logit scale)', reference: 0, scale: 'linear' },
  calibrationSlope: { title: 'Calibration slope', reference: 1, scale: 'linear' },
  sensitivity: { title: 'Sensitivity at the cut-off', reference: 0, scale: 'linear' },
  specificity: { title: 'Specificity at the cut-off', reference: 0, scale: 'linear' },
  fractionFlagged: { title: 'Fraction flagged at the cut-off', reference: 0, scale: 'linear' },
};

function estimateOf(r: SubgroupRow, m: SubgroupMeasure): Pick<ForestRow, 'estimate' | 'lower' | 'upper'> {
  const none = { estimate: null, lower: null, upper: null };
  switch (m) {
    case 'observedExpected':
      return r.observedExpected;
    case 'auc':
      return r.auc ? { estimate: r.auc.estimate, lower: r.auc.lower, upper: r.auc.upper } : none;
    case 'calibrationInTheLarge':
    case 'calibrationSlope': {
      const c = r[m];
      return c ? { estimate: c.estimate, lower: c.lower, upper: c.upper } : none;
    }
    default: {
      const p = r.atCutoff?.[m];
      return p ? { estimate: p.estimate, lower: p.lower, upper: p.upper } : none;
    }
  }
}

const forestRow = (r: SubgroupRow, m: SubgroupMeasure): ForestRow => ({
  label: r.label,
  n: r.n,
  events: r.events,
  ...estimateOf(r, m),
  precision: r.precision,
});

/**
 * The rows of a forest plot of one measure: each group's estimate with its interval, the overall row, the
 * reference line (1 for O/E and the slope, 0 for calibration-in-the-large, 0.5 for AUC; 0 for the cut-off
 * proportions, whose axis starts there) and the scale (log for O/E). A group whose estimate was not computed keeps
 * its row with null numbers, so the plot can say why (`precision`). No drawing: plain data.
 */
export function forestData(perf: SubgroupPerformance, measure: SubgroupMeasure): ForestData {
  return {
    column: perf.column,
    measure,
    ...AXIS[measure],
    rows: perf.rows.map((r) => forestRow(r, measure)),
    overall: forestRow(perf.overall, measure),
    level: perf.level,
  };
}
