import { warning, type EngineWarning } from '../core/warnings';
import { checkScoredOutcome } from './threshold';

export interface BrierResult {
  /** Mean squared difference between outcome and predicted risk (Brier 1950, Mon Weather Rev 78:1). */
  brier: number | null;
  /** Brier score of predicting the observed outcome rate for everyone: ȳ(1 − ȳ). */
  brierNull: number | null;
  /** 1 − brier/brierNull (Steyerberg et al. 2010, Epidemiology 21:128); null when all outcomes are equal. */
  scaledBrier: number | null;
  warnings: EngineWarning[];
}

/** Brier score and scaled Brier score of risks p for a 0/1 outcome y, with optional case weights. */
export function brierScore(y: Float64Array, p: Float64Array, weights?: Float64Array): BrierResult {
  checkScoredOutcome(y, p, weights, true);
  let sw = 0;
  let sy = 0;
  let se = 0;
  for (let i = 0; i < y.length; i++) {
    const w = weights ? weights[i] : 1;
    const d = y[i] - p[i];
    sw += w;
    sy += w * y[i];
    se += w * d * d;
  }
  if (!(sw > 0))
    return {
      brier: null,
      brierNull: null,
      scaledBrier: null,
      warnings: [
        warning(
          'no-cases',
          'There are no cases (or all weights are 0), so the Brier score cannot be computed.',
          'Check the data selection.',
        ),
      ],
    };
  const brier = se / sw;
  const rate = sy / sw;
  const brierNull = rate * (1 - rate);
  const warnings: EngineWarning[] = [];
  if (brierNull === 0)
    warnings.push(
      warning(
        'one-class-only',
        'All outcomes are the same, so the scaled Brier score is undefined.',
        'Evaluate on data that contain both events and non-events.',
      ),
    );
  return { brier, brierNull, scaledBrier: brierNull > 0 ? 1 - brier / brierNull : null, warnings };
}
