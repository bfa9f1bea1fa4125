import { FulcraError } from '../core/data';
import { brierScore, type BrierResult } from './brier';
import { calibrationRegression, riskToLinearPredictor, type CalibrationRegression } from './calibration';
import { calibrationCurve, type CalibrationCurve } from './calibrationCurve';
import { delongFromPrepared, type AucInterval } from './delong';
import { hosmerLemeshow, type HosmerLemeshowResult } from './hosmerLemeshow';
import { decisionCurve, type DecisionCurve } from './netBenefit';
import { prFromPrepared, type PrCurve } from './prCurve';
import { rocFromPrepared, type RocCurve } from './roc';
import {
  atThreshold,
  costThresholds,
  expectedCostCurve,
  FLAG_RULE,
  prepareThresholds,
  thresholdGrid,
  type CostThresholds,
  type DecisionCosts,
  type PreparedThresholds,
  type ThresholdMetrics,
} from './threshold';
import { warning, type EngineWarning } from '../core/warnings';

export interface EvaluateOptions {
  /** Case weights (frequency-type). DeLong intervals and Hosmer–Lemeshow are unweighted and are then left out. */
  weights?: Float64Array;
  /** The model's linear predictor; when omitted, logit(p) is used for the calibration fits. */
  eta?: Float64Array;
  level?: number;
  aucScale?: 'auc' | 'logit';
  calibrationKnots?: 3 | 4 | 5;
  rocPoints?: number;
  hlGroups?: number;
  /** Decision-curve thresholds; default 0.01, 0.02, …, 0.99. */
  grid?: Float64Array;
  costs?: DecisionCosts;
  /** Threshold for the confusion matrix; default: the decision-theory threshold when costs are given. */
  threshold?: number;
  /** Keep the prepared threshold structure in the record (for a live threshold slider); default true. */
  includePrepared?: boolean;
}

export interface EvaluationRecord {
  n: number;
  events: number;
  nonEvents: number;
  outcomeRate: number | null;
  meanRisk: number | null;
  flagRule: string;
  roc: RocCurve;
  auc: AucInterval;
  pr: PrCurve;
  brier: BrierResult;
  calibration: CalibrationRegression;
  calibrationCurve: CalibrationCurve;
  /** Secondary; null when weights are given. */
  hosmerLemeshow: HosmerLemeshowResult | null;
  decisionCurve: DecisionCurve;
  costs: { thresholds: CostThresholds; curve: { thresholds: number[]; costPer100: number[] } } | null;
  atThreshold: ThresholdMetrics | null;
  prepared: PreparedThresholds | null;
  /** Every warning of every part, once. */
  warnings: EngineWarning[];
}

/** Frequency-weighted data are written out one row per case for the Hosmer–Lemeshow groups up to this many cases. */
const HL_MAX_CASES = 5_000_000;

/** Outcome and risk with each row repeated by its (whole-number) weight: the data one row per case. */
function casesWrittenOut(y: Float64Array, p: Float64Array, w: Float64Array, cases: number) {
  const oy = new Float64Array(cases);
  const op = new Float64Array(cases);
  let k = 0;
  for (let i = 0; i < y.length; i++) {
    oy.fill(y[i], k, k + w[i]);
    op.fill(p[i], k, k + w[i]);
    k += w[i];
  }
  return { y: oy, p: op };
}

/** The risks behind an unweighted threshold structure, sorted: each distinct risk as often as cases hold it. */
function sortedFromPrepared(prep: PreparedThresholds): Float64Array {
  const { risks, eventsAtOrAbove: e, nonEventsAtOrAbove: ne } = prep;
  const out = new Float64Array(prep.total);
  let at = 0;
  for (let k = 0; k < risks.length; k++) {
    const next = k + 1 < risks.length ? e[k + 1] + ne[k + 1] : 0;
    const count = e[k] + ne[k] - next;
    out.fill(risks[k], at, at + count);
    at += count;
  }
  return out;
}

/**
 * All evaluation measures of predicted risks p for a 0/1 outcome y in one plain record: ROC (thinned) and
 * AUC with DeLong CI, PR curve and average precision, Brier, calibration intercept/slope, flexible calibration
 * curve with ICI/E50/E90/Emax, Hosmer–Lemeshow (secondary), decision curve and, with costs, the cost-based
 * thresholds. O(n log n) overall: one sort for everything threshold-based, two for DeLong, three for quantiles.
 */
export function evaluate(y: Float64Array, p: Float64Array, options: EvaluateOptions = {}): EvaluationRecord {
  const level = options.level ?? 0.95;
  const w = options.weights;
  const prep = prepareThresholds(y, p, w, true);
  let eta: Float64Array;
  const warnings: EngineWarning[] = [];
  if (options.eta) {
    if (options.eta.length !== y.length)
      throw new FulcraError(
        'length-mismatch',
        `The outcome has ${y.length} rows but the linear predictor has ${options.eta.length}.`,
      );
    eta = options.eta;
  } else {
    const lp = riskToLinearPredictor(p);
    eta = lp.eta;
    warnings.push(...lp.warnings);
  }
  let auc: AucInterval;
  const roc = rocFromPrepared(prep, options.rocPoints ?? 500);
  if (w && !prep.frequencyWeights) {
    auc = {
      auc: roc.auc,
      se: null,
      lower: null,
      upper: null,
      level,
      ciMethod: 'none',
      events: prep.events,
      nonEvents: prep.nonEvents,
      warnings: [],
    };
    warnings.push(
      warning(
        'weights-no-delong',
        'With case weights that are not whole numbers the AUC is the weighted one, and no DeLong interval is given ' +
          '(the DeLong variance counts cases).',
        'Use a bootstrap interval for weighted data.',
      ),
    );
  } else {
    auc = delongFromPrepared(prep, { level, scale: options.aucScale });
  }
  let hl: HosmerLemeshowResult | null = null;
  const cases = w ? prep.total : y.length;
  // Without weights, the threshold structure holds the risks' sorted values and counts: the risks sorted, in O(n).
  const sortedRisks = w ? null : sortedFromPrepared(prep);
  if (!w) hl = hosmerLemeshow(y, p, options.hlGroups ?? 10, sortedRisks ?? undefined);
  else if (prep.frequencyWeights && cases <= HL_MAX_CASES) {
    const one = casesWrittenOut(y, p, w, cases);
    hl = hosmerLemeshow(one.y, one.p, options.hlGroups ?? 10);
  } else
    warnings.push(
      warning(
        'weights-no-hl',
        prep.frequencyWeights
          ? `The Hosmer–Lemeshow test is computed for at most ${HL_MAX_CASES.toLocaleString('en')} cases.`
          : 'The Hosmer–Lemeshow test is not computed with case weights that are not whole numbers.',
        'Read the calibration curve, slope and intercept.',
      ),
    );
  const pr = prFromPrepared(prep, options.rocPoints ?? 500);
  const brier = brierScore(y, p, w);
  const calibration = calibrationRegression(y, eta, { weights: w, level });
  const curve = calibrationCurve(y, eta, { knots: options.calibrationKnots, level, weights: w });
  const dc = decisionCurve(prep, options.grid ?? thresholdGrid());
  const costs = options.costs
    ? {
        thresholds: costThresholds(prep, options.costs),
        curve: expectedCostCurve(prep, options.costs, options.grid ?? thresholdGrid()),
      }
    : null;
  const t = options.threshold ?? costs?.thresholds.decisionTheory.threshold;
  let meanRisk = 0;
  for (let i = 0; i < p.length; i++) meanRisk += (w ? w[i] : 1) * p[i];
  const parts = [
    roc.warnings,
    auc.warnings,
    pr.warnings,
    brier.warnings,
    calibration.warnings,
    curve.warnings,
    hl?.warnings ?? [],
  ];
  for (const list of parts)
    for (const x of list) if (!warnings.some((v) => v.code === x.code && v.message === x.message)) warnings.push(x);
  return {
    n: w ? prep.total : y.length,
    events: prep.events,
    nonEvents: prep.nonEvents,
    outcomeRate: prep.total > 0 ? prep.events / prep.total : null,
    meanRisk: prep.total > 0 ? meanRisk / prep.total : null,
    flagRule: FLAG_RULE,
    roc,
    auc,
    pr,
    brier,
    calibration,
    calibrationCurve: curve,
    hosmerLemeshow: hl,
    decisionCurve: dc,
    costs,
    atThreshold: t === undefined ? null : atThreshold(prep, t, { costs: options.costs, level }),
    prepared: options.includePrepared === false ? null : prep,
    warnings,
  };
}
