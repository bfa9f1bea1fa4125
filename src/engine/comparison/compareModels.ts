import { FulcraError } from '../core/data';
import { checkLevel } from '../core/vectors';
import { warning, type EngineWarning } from '../core/warnings';
import { brierScore } from '../evaluation/brier';
import { calibrationRegression } from '../evaluation/calibration';
import { delongAuc, delongPairedTest } from '../evaluation/delong';
import { decisionCurve } from '../evaluation/netBenefit';
import { decisionTheoryThreshold, prepareThresholds, thresholdGrid } from '../evaluation/threshold';
import { sigmoid } from '../numerics/loss';
import { compareNesting, nonAliased } from './nesting';
import { pairedBrierDifference } from './pairedBrier';
import { reclassification } from './reclassification';
import { alignSameRows } from './sameRows';
import type { ComparedModel, ComparedSide, CompareOptions, ModelComparison, NetBenefitComparison } from './types';

function side(m: ComparedModel): ComparedSide {
  return {
    label: m.label,
    method: m.fit.method,
    terms: m.fit.recipe.terms.map((t) => t.name),
    nonAliasedCoefficients: nonAliased(m.fit),
    deviance: m.fit.deviance,
    aic: m.fit.aic,
    bic: m.fit.bic,
  };
}

function checkMaterial(m: ComparedModel): void {
  const n = m.rowsUsed.length;
  if (m.eta.length !== n || m.y.length !== n)
    throw new FulcraError(
      'bad-comparison-input',
      `${m.label}: ${m.rowsUsed.length} rows used but ${m.eta.length} linear predictors and ${m.y.length} ` +
        'outcomes; each row used needs one of each.',
    );
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(m.eta[i]))
      throw new FulcraError(
        'bad-comparison-input',
        `${m.label}: the linear predictor of value number ${i + 1} is ${m.eta[i]}.`,
      );
  }
}

const labelled = (label: string, ws: EngineWarning[]): EngineWarning[] =>
  ws.map((w) => ({ ...w, message: `${label}: ${w.message}` }));

function dedupe(ws: EngineWarning[]): EngineWarning[] {
  return ws.filter((w, i) => ws.findIndex((u) => u.code === w.code && u.message === w.message) === i);
}

function netBenefit(
  y: Float64Array,
  riskA: Float64Array,
  riskB: Float64Array,
  grid: Float64Array,
): NetBenefitComparison {
  const a = decisionCurve(prepareThresholds(y, riskA), grid);
  const b = decisionCurve(prepareThresholds(y, riskB), grid);
  return {
    thresholds: a.thresholds,
    a: a.model,
    b: b.model,
    treatAll: a.treatAll,
    difference: b.model.map((v, k) => v - a.model[k]),
    prevalence: a.prevalence,
  };
}

/**
 * Compares two models fitted on the same rows of one dataset; every difference is model b − model a.
 * Refuses (FulcraError 'compare-different-rows') models fitted on different rows — `commonRows` gives the rows to
 * leave out of both refits — and models of different outcomes or events (nesting.ts).
 * - nesting and, for nested maximum-likelihood fits, the likelihood-ratio test; AIC and BIC of each;
 * - AUC of each (DeLong) and the paired DeLong test of the difference (DeLong et al. 1988, Biometrics 44:837);
 * - Brier score of each and the paired difference (pairedBrier.ts); calibration-in-the-large and slope of each;
 * - net benefit of each, of treat-all and the difference over a threshold grid (Vickers & Elkin 2006);
 * - at the user's cut-off (or the costs' decision-theory threshold): who each model flags, among events,
 *   non-events and all, and the net reclassification improvement (Pencina et al. 2008, Stat Med 27:157).
 * Risks are sigmoid(eta). Apparent performance: both models are scored on the rows they were fitted on.
 */
export function compareModels(a: ComparedModel, b: ComparedModel, options: CompareOptions = {}): ModelComparison {
  const level = checkLevel(options.level);
  checkMaterial(a);
  checkMaterial(b);
  const at = alignSameRows(a, b, options.rows);
  const y = a.y;
  const etaB = Float64Array.from(at, (k) => b.eta[k]);
  for (let i = 0; i < y.length; i++) {
    if (b.y[at[i]] !== y[i])
      throw new FulcraError(
        'compare-different-outcome',
        `The two models read different outcomes on the same row (dataset index ${a.rowsUsed[i]}: ${y[i]} and ` +
          `${b.y[at[i]]}), so they cannot be compared.`,
        'Fit both models to the same outcome column with the same event level.',
      );
  }
  const nesting = compareNesting(a, b);
  const riskA = a.eta.map(sigmoid);
  const riskB = etaB.map(sigmoid);
  let events = 0;
  for (let i = 0; i < y.length; i++) events += y[i];
  const warnings: EngineWarning[] = [];

  const aucA = delongAuc(y, a.eta, { level });
  const aucB = delongAuc(y, etaB, { level });
  const aucDiff = delongPairedTest(y, etaB, a.eta, { level });
  if (nesting.relation === 'a-within-b' || nesting.relation === 'b-within-a')
    warnings.push(
      warning(
        'compare-auc-test-nested',
        'One model is nested in the other and both were fitted on these rows: the DeLong test of the difference ' +
          'in AUC ignores that the coefficients were estimated here and is then far too cautious (Pepe et al. ' +
          '2013, Stat Med 32:1467). Whether the added terms improve the model is what the likelihood-ratio test ' +
          'answers.',
        'Read the likelihood-ratio test for the added terms; read the AUC difference as a size, not as a test.',
      ),
    );

  const brierA = brierScore(y, riskA);
  const brierB = brierScore(y, riskB);
  const calA = calibrationRegression(y, a.eta, { level });
  const calB = calibrationRegression(y, etaB, { level });

  const costs = options.costs ?? null;
  const given = options.threshold ?? null;
  if (given !== null && !(given > 0 && given < 1))
    throw new FulcraError('bad-threshold', `The cut-off must lie strictly between 0 and 1, got ${given}.`);
  const threshold = given ?? (costs ? decisionTheoryThreshold(costs) : null);
  if (threshold === null)
    warnings.push(
      warning(
        'compare-no-cut-off',
        'No cut-off and no costs were given, so the tables of who each model flags are not shown.',
        'Set a cut-off (or the costs of a missed case and a false alarm) to see them.',
      ),
    );

  return {
    a: side(a),
    b: side(b),
    n: y.length,
    events,
    nonEvents: y.length - events,
    level,
    nesting,
    auc: { a: aucA, b: aucB, difference: aucDiff },
    brier: { a: brierA, b: brierB, difference: pairedBrierDifference(y, riskA, riskB, level) },
    calibration: { a: calA, b: calB },
    netBenefit: netBenefit(y, riskA, riskB, options.grid ?? thresholdGrid()),
    reclassification:
      threshold === null
        ? null
        : reclassification(y, riskA, riskB, threshold, given !== null ? 'given' : 'costs', costs),
    warnings: dedupe([
      ...warnings,
      ...aucDiff.warnings,
      ...labelled(a.label, [...aucA.warnings, ...brierA.warnings, ...calA.warnings]),
      ...labelled(b.label, [...aucB.warnings, ...brierB.warnings, ...calB.warnings]),
    ]),
  };
}
