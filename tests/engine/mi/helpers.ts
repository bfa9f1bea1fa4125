import { readFileSync } from 'node:fs';
import type { Dataset } from '../../../src/engine/core/data';
import type { FitResult } from '../../../src/engine/core/model';

/** The incomplete MASS::birthwt subset written by tests/fixtures/reference/mi-pool.R. */
export function loadPoolFixture() {
  return JSON.parse(readFileSync(new URL('../../fixtures/reference/mi-pool.json', import.meta.url), 'utf8'));
}

export function birthwtIncomplete(): Dataset {
  const inc = loadPoolFixture().incomplete;
  const num = (name: string, v: (number | null)[]) => ({
    kind: 'numeric' as const,
    name,
    values: Float64Array.from(v, (x) => (x === null ? NaN : x)),
  });
  return {
    nRows: inc.nRows,
    columns: [
      num('low', inc.low),
      num('age', inc.age),
      num('lwt', inc.lwt),
      { kind: 'categorical', name: 'race', codes: Int32Array.from(inc.race), levels: inc.raceLevels },
      { kind: 'categorical', name: 'smoke', codes: Int32Array.from(inc.smoke), levels: inc.smokeLevels },
    ],
  };
}

/**
 * A FitResult carrying only what pooling reads: coefficient rows (name, estimate, se, aliased), nUsed, covariance,
 * terms.
 */
export function fitRecord(
  names: string[],
  estimates: number[],
  ses: (number | null)[],
  nUsed: number,
  aliased: boolean[] = [],
  covariance: number[] | null = null,
  terms: { name: string; columns: number[] }[] = [],
): FitResult {
  return {
    method: 'ml',
    lambda: 0,
    level: 0.95,
    converged: true,
    iterations: 5,
    coefficients: names.map((name, j) => ({
      name,
      term: name,
      estimate: estimates[j],
      se: ses[j],
      z: null,
      p: null,
      waldLower: null,
      waldUpper: null,
      profileLower: null,
      profileUpper: null,
      oddsRatio: Math.exp(estimates[j]),
      aliased: aliased[j] ?? false,
    })),
    terms: terms.map((t) => ({ ...t, df: t.columns.length, lrChi2: null, lrP: null })),
    deviance: 0,
    nullDeviance: 0,
    logLik: 0,
    aic: 0,
    bic: 0,
    modelLrChi2: 0,
    modelDf: 0,
    modelLrP: 1,
    nUsed,
    nDropped: 0,
    droppedByColumn: {},
    events: 0,
    nonEvents: 0,
    parameters: names.length - 1,
    eventsPerParameter: 0,
    covariance,
    recipe: { outcome: 'y', event: '1', terms: [], columnNames: names },
    warnings: [],
  };
}
