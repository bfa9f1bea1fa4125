import { oddsRatio } from '../fitting/oddsRatio';
import { fitSmallLogistic, type IntervalEstimate } from '../evaluation/calibration';
import { FulcraError } from '../core/data';
import { checkLevel, checkOutcomeAndPredictor, type WeightsAndLevel } from '../core/vectors';
import { qnorm } from '../numerics/distributions';
import type { DesignRecipe } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';

/** Anything that scores new data: a recipe and coefficients in recipe.columnNames order (FitResult, PipelineFit…). */
export interface ScoringModel {
  recipe: DesignRecipe;
  coefficients: { name: string; estimate: number }[];
}

export type RecalibrationKind = 'intercept' | 'intercept-slope';

/**
 * Logistic recalibration of a linear predictor LP on new outcomes (Steyerberg 2019, Clinical Prediction
 * Models 2nd ed., ch. 20; Janssen et al. 2008, J Clin Epidemiol 61:76):
 *   'intercept':       logit P(y) = a + 1·LP   (LP as offset; updates the intercept only)
 *   'intercept-slope': logit P(y) = a + b·LP   (re-estimates intercept and a common slope)
 * Maximum likelihood with Wald intervals (as R's glm + confint.default).
 */
export interface Recalibration {
  kind: RecalibrationKind;
  intercept: IntervalEstimate;
  /** null for 'intercept' (fixed at 1). */
  slope: IntervalEstimate | null;
  /** Residual deviance of the recalibration model. */
  deviance: number;
  converged: boolean;
  level: number;
}

export interface RecalibrationResult {
  interceptOnly: Recalibration | null;
  interceptSlope: Recalibration | null;
  warnings: EngineWarning[];
}

/** A recalibrated model: same recipe, updated coefficients, and how they were obtained. */
export interface RecalibratedModel extends ScoringModel {
  kind: RecalibrationKind;
  coefficients: { name: string; estimate: number; oddsRatio: number }[];
  /** a and b of the recalibration (b = 1 for 'intercept'). */
  a: number;
  b: number;
}

/** Fits both recalibration models of `lp` on the 0/1 outcome y (optional case weights). */
export function recalibrate(y: Float64Array, lp: Float64Array, options: WeightsAndLevel = {}): RecalibrationResult {
  const level = checkLevel(options.level);
  const n = y.length,
    w = options.weights;
  checkOutcomeAndPredictor(y, lp);
  let ev = 0,
    sw = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    ev += wi * y[i];
    sw += wi;
  }
  if (!(ev > 0 && ev < sw)) {
    return {
      interceptOnly: null,
      interceptSlope: null,
      warnings: [
        warning(
          'one-class-only',
          'Recalibration needs both events and non-events in the new data.',
          'Recalibrate on data that contain both.',
        ),
      ],
    };
  }
  const z = qnorm(1 - (1 - level) / 2);
  const est = (e: number, v: number): IntervalEstimate => ({
    estimate: e,
    se: Math.sqrt(v),
    lower: e - z * Math.sqrt(v),
    upper: e + z * Math.sqrt(v),
  });
  const warnings: EngineWarning[] = [];
  const ones = new Float64Array(n).fill(1);
  const a = fitSmallLogistic(ones, n, 1, y, w, lp);
  const interceptOnly: Recalibration | null = a.cov
    ? {
        kind: 'intercept',
        intercept: est(a.beta[0], a.cov[0]),
        slope: null,
        deviance: -2 * a.logLik,
        converged: a.converged,
        level,
      }
    : null;
  const X = new Float64Array(2 * n);
  X.set(ones);
  X.set(lp, n);
  const s = fitSmallLogistic(X, n, 2, y, w);
  let interceptSlope: Recalibration | null = null;
  if (s.cov) {
    interceptSlope = {
      kind: 'intercept-slope',
      intercept: est(s.beta[0], s.cov[0]),
      slope: est(s.beta[1], s.cov[3]),
      deviance: -2 * s.logLik,
      converged: s.converged,
      level,
    };
  } else {
    warnings.push(
      warning(
        'recalibration-slope-undefined',
        'The linear predictor does not vary in the new data, so a slope cannot be re-estimated.',
        'Use intercept-only recalibration.',
      ),
    );
  }
  if (!a.converged || !s.converged) {
    warnings.push(
      warning(
        'recalibration-not-converged',
        'A recalibration fit did not converge (the linear predictor may separate events from non-events).',
        'Treat the recalibrated model as unreliable.',
      ),
    );
  }
  return { interceptOnly, interceptSlope, warnings };
}

/**
 * The updated model: 'intercept' adds a to the intercept; 'intercept-slope' multiplies every coefficient by
 * b and then adds a to the intercept (logit P = a + b·(β₀ + Σβⱼxⱼ)).
 */
export function recalibratedModel(model: ScoringModel, r: Recalibration): RecalibratedModel {
  if (model.coefficients[0]?.name !== '(Intercept)') {
    throw new FulcraError('no-intercept', 'The model to recalibrate must have its intercept first.');
  }
  const a = r.intercept.estimate,
    b = r.slope ? r.slope.estimate : 1;
  const coefficients = model.coefficients.map((c, j) => {
    const estimate = j === 0 ? a + b * c.estimate : b * c.estimate;
    return { name: c.name, estimate, oddsRatio: oddsRatio(estimate) };
  });
  return { kind: r.kind, recipe: model.recipe, coefficients, a, b };
}
