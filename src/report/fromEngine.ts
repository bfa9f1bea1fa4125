import type { Costs, FitResult } from '../engine/core';
import type { EvaluationRecord } from '../engine/evaluation';
import type { InternalValidation, MetricName } from '../engine/validation';
import type { SampleSizeResult } from '../engine/evaluation';
import type { EngineWarning } from '../engine/core';
import type { ExternalRecord } from '../engine/workflow';
import type { Estimate, ImputationSummary, PerformanceSummary, ReportInput } from './reportInput';
import { SAME_CASES_CODE } from '../engine/validation';
import type { ExternalSummary } from './reportSectionExternal';

export interface ReportRecords {
  meta: ReportInput['meta'];
  source: ReportInput['source'];
  freeText?: ReportInput['freeText'];
  fit: FitResult;
  /** The outcome layout of the analysis (tables of counts, frequency weights). */
  layout?: ReportInput['layout'];
  /** evaluate() on the development data (apparent performance, plots, threshold). */
  evaluation?: EvaluationRecord;
  /** bootstrapValidation() or repeatedCrossValidation(). */
  validation?: InternalValidation;
  sampleSize?: SampleSizeResult;
  costs?: Costs;
  /** False when the costs are the page's default that nobody set. */
  costsSetByUser?: boolean;
  thresholdRule?: string;
  lambdaChoice?: string;
  missingData?: string;
  /** The model pooled over multiple imputations (its warnings go in `warnings`). */
  imputation?: ImputationSummary;
  /** External validation on a second file (with how many of its cases are development cases, when known). */
  external?: ExternalRecord;
  /** Other warnings to list (imputation, import…). */
  warnings?: EngineWarning[];
  cautionSetting?: ReportInput['cautionSetting'];
  /** Monitoring of later cases (the engine's MonitoringRecord, with the recalibration when asked for). */
  monitoring?: ReportInput['monitoring'];
  /** Influential rows (the record's diagnostics summary, the rows left out, Cook's distance by row for the plot). */
  diagnostics?: ReportInput['diagnostics'];
  /** The bedside points score, when one was built for this fit. */
  points?: ReportInput['points'];
  /** Odds ratios per these units, by numeric predictor (the page's choice). */
  oddsUnits?: ReportInput['oddsUnits'];
}

const riley: Record<'i' | 'ii' | 'iii', string> = {
  i: '(i) expected shrinkage',
  ii: '(ii) optimism in Nagelkerke R\u00b2',
  iii: '(iii) precise overall risk',
};

/** Assembles the PDF builder's input from the engine's records (fit, evaluate, internal validation, Riley). */
export function reportInputFromRecords(r: ReportRecords): ReportInput {
  const ev = r.evaluation;
  const input: ReportInput = {
    meta: r.meta,
    source: r.source,
    freeText: r.freeText,
    model: r.fit,
    layout: r.layout,
    lambdaChoice: r.lambdaChoice,
    missingData: r.missingData,
    imputation: r.imputation,
    cautionSetting: r.cautionSetting,
    oddsUnits: r.oddsUnits,
    warnings: [
      ...(ev?.warnings ?? []),
      ...(r.validation?.warnings ?? []),
      ...(r.sampleSize?.warnings ?? []),
      ...(r.warnings ?? []),
    ],
  };
  if (ev) {
    const e = (x: { estimate: number; lower: number; upper: number } | null): Estimate | null =>
      x ? { estimate: x.estimate, lower: x.lower, upper: x.upper } : null;
    input.apparent = {
      auc: ev.auc.auc === null ? null : { estimate: ev.auc.auc, lower: ev.auc.lower, upper: ev.auc.upper },
      calibrationSlope: e(ev.calibration.slope),
      calibrationIntercept: e(ev.calibration.interceptInTheLarge),
      brier: ev.brier.brier === null ? null : { estimate: ev.brier.brier, lower: null, upper: null },
      scaledBrier: ev.brier.scaledBrier === null ? null : { estimate: ev.brier.scaledBrier, lower: null, upper: null },
    };
    input.roc = { fpr: ev.roc.fpr, tpr: ev.roc.tpr, auc: ev.roc.auc ?? undefined };
    const cc = ev.calibrationCurve;
    input.calibration = { predicted: cc.predicted, observed: cc.observed, lower: cc.lower, upper: cc.upper };
    input.calibrationErrors = { ici: cc.ici, e50: cc.e50, e90: cc.e90, emax: cc.emax };
    if (ev.hosmerLemeshow) {
      input.calibration.groups = ev.hosmerLemeshow.groups.map((g) => ({
        predicted: g.meanRisk,
        observed: g.observedEvents / g.n,
      }));
    }
    input.decisionCurve = {
      thresholds: ev.decisionCurve.thresholds,
      model: ev.decisionCurve.model,
      treatAll: ev.decisionCurve.treatAll,
    };
    const at = ev.atThreshold;
    if (at && r.costs) {
      input.threshold = {
        threshold: at.threshold,
        costMissedCase: r.costs.missedCase,
        costFalseAlarm: r.costs.falseAlarm,
        tp: at.tp,
        fp: at.fp,
        fn: at.fn,
        tn: at.tn,
        sensitivity: at.sensitivity,
        specificity: at.specificity,
        ppv: at.ppv,
        npv: at.npv,
        fractionFlagged: at.fractionFlagged.estimate ?? undefined,
        expectedCostPer100: at.expectedCostPer100 ?? undefined,
        lrPositive: { estimate: at.lrPositive, ci: at.lrPositiveCi },
        lrNegative: { estimate: at.lrNegative, ci: at.lrNegativeCi },
        rule: r.thresholdRule,
        costsSetByUser: r.costsSetByUser,
      };
    }
  }
  const v = r.validation;
  if (v) {
    const row = (m: MetricName) => v.rows.find((x) => x.metric === m);
    const corr = (m: MetricName): Estimate | null => {
      const x = row(m);
      return x && x.corrected !== null ? { estimate: x.corrected, lower: null, upper: null } : null;
    };
    const opt = (m: MetricName): Estimate | null => {
      const x = row(m);
      return x && x.optimism !== null ? { estimate: x.optimism, lower: x.lower, upper: x.upper } : null;
    };
    const pick = (f: (m: MetricName) => Estimate | null): PerformanceSummary => ({
      auc: f('auc'),
      calibrationSlope: f('calibrationSlope'),
      calibrationIntercept: f('calibrationInTheLarge'),
      brier: f('brier'),
    });
    input.corrected = {
      ...pick(corr),
      optimism: pick(opt),
      method:
        v.method === 'bootstrap'
          ? 'bootstrap optimism correction, refitting the whole modelling procedure in each replicate ' +
            '(Harrell, Lee & Mark 1996, Stat Med 15:361)'
          : 'repeated cross-validation',
      replicates: v.planned - v.failed,
    };
  }
  if (r.external) input.external = externalSummary(r.external, r.fit.level);
  if (r.monitoring) input.monitoring = r.monitoring;
  if (r.diagnostics) input.diagnostics = r.diagnostics;
  if (r.points) input.points = r.points;
  const s = r.sampleSize;
  if (s) {
    input.sampleSize = {
      requiredN: s.requiredN,
      bindingCriterion: riley[s.binding],
      criteria: s.criteria.map((c) => ({ label: riley[c.id], n: c.n, met: c.met, consequence: c.consequence })),
      assumedR2: s.r2cs,
      shrinkageTarget: null,
      met: s.actual ? s.actual.enough : null,
    };
  }
  return input;
}

/** The external-validation record as the PDF prints it. */
function externalSummary(x: NonNullable<ReportRecords['external']>, level: number): ExternalSummary {
  const ev = x.evaluation;
  const e = (v: { estimate: number; lower: number; upper: number } | null | undefined): Estimate | null =>
    v ? { estimate: v.estimate, lower: v.lower, upper: v.upper } : null;
  const rs = x.recalibration.interceptSlope;
  return {
    nRows: x.nRows,
    n: x.nUsed,
    level,
    auc: ev.auc.auc === null ? null : { estimate: ev.auc.auc, lower: ev.auc.lower, upper: ev.auc.upper },
    calibrationIntercept: e(ev.calibration.interceptInTheLarge),
    calibrationSlope: e(ev.calibration.slope),
    brier: ev.brier.brier,
    recalibrated: rs ? { intercept: e(rs.intercept)!, slope: e(rs.slope) } : null,
    sameCases: x.warnings.some((w) => w.code === SAME_CASES_CODE),
    warnings: x.warnings,
  };
}
