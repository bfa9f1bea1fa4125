import type { EvaluationSummary } from '../engine/workflow';
import type { PerformanceView } from './protocol';

const nan = (x: number | null | undefined) => (x === null || x === undefined ? NaN : x);

/** The plotted and tabulated subset of an evaluation record. */
export function toView(r: EvaluationSummary): PerformanceView {
  const cal = r.calibration,
    curve = r.calibrationCurve,
    hl = r.hosmerLemeshow;
  const view: PerformanceView = {
    auc: nan(r.auc.auc),
    aucLower: nan(r.auc.lower),
    aucUpper: nan(r.auc.upper),
    roc: r.roc.fpr.map((x, i) => ({ x, y: r.roc.tpr[i] })),
    pr: r.pr.recall.map((x, i) => ({ x, y: r.pr.precision[i] })),
    averagePrecision: nan(r.pr.averagePrecision),
    brier: nan(r.brier.brier),
    scaledBrier: nan(r.brier.scaledBrier),
    calSlope: nan(cal.slope?.estimate),
    calSlopeLower: nan(cal.slope?.lower),
    calSlopeUpper: nan(cal.slope?.upper),
    calInLarge: nan(cal.interceptInTheLarge?.estimate),
    calInLargeLower: nan(cal.interceptInTheLarge?.lower),
    calInLargeUpper: nan(cal.interceptInTheLarge?.upper),
    calibration: curve.predicted.map((q, i) => ({
      p: q,
      observed: curve.observed[i],
      lower: curve.lower[i],
      upper: curve.upper[i],
    })),
    ici: nan(curve.ici),
    e50: nan(curve.e50),
    e90: nan(curve.e90),
    emax: nan(curve.emax),
    hosmerLemeshow:
      !hl || hl.statistic === null || hl.df === null || hl.p === null
        ? null
        : { chi2: hl.statistic, df: hl.df, p: hl.p, groups: hl.groups.length },
    decision: r.decisionCurve.thresholds.map((t, i) => ({
      t,
      model: r.decisionCurve.model[i],
      all: r.decisionCurve.treatAll[i],
    })),
    warnings: r.warnings,
  };
  return view;
}
