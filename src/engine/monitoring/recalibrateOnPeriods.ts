import { FulcraError } from '../core/data';
import { recalibrate, recalibratedModel, type ScoringModel } from '../validation/recalibration';
import type { MonitoringCases } from './monitor';
import { periodRanges } from './periods';
import type { MonitoringPeriod, RecalibrateOnPeriodsOptions, RecalibrationOnPeriods } from './types';

/**
 * Logistic recalibration (validation/recalibration.ts: intercept only, and intercept and slope of the linear
 * predictor) on the cases of the latest `periods` calendar periods of a monitoring file. The updated model keeps
 * the recipe; its coefficients are a + b·β (intercept a + b·β₀).
 */
export function recalibrateOnPeriods(
  model: ScoringModel,
  cases: MonitoringCases,
  period: MonitoringPeriod,
  options: RecalibrateOnPeriodsOptions,
): RecalibrationOnPeriods {
  const ranges = periodRanges(cases.date, period);
  const k = options.periods;
  if (!(Number.isInteger(k) && k >= 1))
    throw new FulcraError('bad-monitoring-option', `Recalibration periods: ${k} is not a whole number ≥ 1.`);
  if (k > ranges.length)
    throw new FulcraError(
      'bad-monitoring-option',
      `Recalibration on the latest ${k} periods was asked for, but the monitoring file has ${ranges.length}.`,
      `Choose from 1 to ${ranges.length} periods.`,
    );
  const chosen = ranges.slice(ranges.length - k);
  const from = chosen[0].from,
    to = chosen[chosen.length - 1].to;
  const y = cases.y.subarray(from, to);
  const result = recalibrate(y, cases.eta.subarray(from, to), { level: options.level });
  let events = 0;
  for (let i = 0; i < y.length; i++) events += y[i];
  const fit = result.interceptSlope ?? result.interceptOnly;
  return {
    periods: chosen.map((r) => r.label),
    nUsed: to - from,
    events,
    intercept: fit ? fit.intercept : null,
    slope: result.interceptSlope ? result.interceptSlope.slope : null,
    recalibration: result,
    model: fit ? recalibratedModel(model, fit) : null,
    warnings: result.warnings,
  };
}
