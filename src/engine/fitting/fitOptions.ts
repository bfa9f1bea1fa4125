import { FulcraError } from '../core/data';
import { defaultFitOptions, type FitOptions } from '../core/model';

/** Options of this implementation beyond model.ts's FitOptions. */
export interface FitExtraOptions {
  /** Likelihood-ratio test per term (one constrained refit per term; default true). */
  termTests: boolean;
  /**
   * Every profile limit and term test by constrained refits instead of the chord-Newton solves (chordSolve.ts):
   * the slower reference path, which tests and the bench compare against (default false).
   */
  refitInference: boolean;
}
export type EngineFitOptions = FitOptions & FitExtraOptions;
export const defaultEngineFitOptions: EngineFitOptions = {
  ...defaultFitOptions,
  termTests: true,
  refitInference: false,
};

/** Declared constraints of every fit option: one table, checked before any work is done. */
export const fitOptionTable: { [K in keyof EngineFitOptions]: { valid: (v: unknown) => boolean; expected: string } } = {
  method: { valid: (v) => v === 'ml' || v === 'ridge' || v === 'firth', expected: "'ml', 'ridge' or 'firth'" },
  lambda: { valid: (v) => typeof v === 'number' && Number.isFinite(v) && v >= 0, expected: 'a finite number ≥ 0' },
  tol: { valid: (v) => typeof v === 'number' && v > 0 && v < 1, expected: 'a number between 0 and 1' },
  maxIter: {
    valid: (v) => Number.isInteger(v) && (v as number) >= 1 && (v as number) <= 10_000,
    expected: 'an integer from 1 to 10000',
  },
  level: { valid: (v) => typeof v === 'number' && v > 0 && v < 1, expected: 'a number between 0 and 1 (e.g. 0.95)' },
  profile: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
  termTests: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
  refitInference: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
};

/** Fills defaults and checks every option against fitOptionTable; throws a FulcraError naming the bad value. */
export function validateFitOptions(options: Partial<EngineFitOptions> = {}): EngineFitOptions {
  for (const key of Object.keys(options)) {
    if (!(key in fitOptionTable)) {
      throw new FulcraError(
        'bad-option',
        `Unknown fit option "${key}". Known options: ${Object.keys(fitOptionTable).join(', ')}.`,
      );
    }
  }
  const o = { ...defaultEngineFitOptions, ...options };
  for (const key of Object.keys(fitOptionTable) as (keyof EngineFitOptions)[]) {
    const v = o[key];
    if (!fitOptionTable[key].valid(v)) {
      throw new FulcraError(
        'bad-option',
        `Fit option ${key} = ${JSON.stringify(v)} is not valid; expected ${fitOptionTable[key].expected}.`,
      );
    }
  }
  if (o.method === 'ridge' && !(o.lambda > 0)) {
    throw new FulcraError(
      'bad-option',
      `Ridge needs lambda > 0, got ${o.lambda}.`,
      'Set lambda, or use method "ml" for an unpenalised fit.',
    );
  }
  return o;
}
