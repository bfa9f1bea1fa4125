import { FulcraError } from './data';

/**
 * Checks on plain vectors (outcome, scores, weights) handed to the evaluation functions. Their positions are not
 * dataset rows, so messages name "value number k" (1-based) of the vector, never a spreadsheet row.
 */

/** "value number k" for 0-based position i of a plain vector. */
export function valueNumber(i: number): string {
  return `value number ${i + 1}`;
}

/** Case weights and confidence level of a calibration or recalibration fit. */
export interface WeightsAndLevel {
  weights?: Float64Array;
  /** Default 0.95. */
  level?: number;
}

/** The confidence level (default 0.95); throws unless 0 < level < 1. */
export function checkLevel(level = 0.95): number {
  if (!(level > 0 && level < 1))
    throw new FulcraError('bad-level', `The confidence level must be between 0 and 1, got ${level}.`);
  return level;
}

/** Throws unless `other` has as many values as the outcome. */
export function checkSameLength(y: ArrayLike<number>, other: ArrayLike<number>, what: string): void {
  if (other.length !== y.length)
    throw new FulcraError('length-mismatch', `The outcome has ${y.length} rows but the ${what} has ${other.length}.`);
}

/** Throws unless y[i] is 0 or 1. */
export function checkBinaryValue(y: ArrayLike<number>, i: number, suggestion?: string): void {
  if (y[i] !== 0 && y[i] !== 1)
    throw new FulcraError('bad-outcome', `The outcome must be 0 or 1; ${valueNumber(i)} is ${y[i]}.`, suggestion);
}

/** A 0/1 outcome and a finite linear predictor of the same length; throws naming the first bad value. */
export function checkOutcomeAndPredictor(y: ArrayLike<number>, eta: ArrayLike<number>): void {
  checkSameLength(y, eta, 'linear predictor');
  for (let i = 0; i < y.length; i++) {
    checkBinaryValue(y, i);
    if (!Number.isFinite(eta[i]))
      throw new FulcraError('bad-score', `The linear predictor must be finite; ${valueNumber(i)} is ${eta[i]}.`);
  }
}
