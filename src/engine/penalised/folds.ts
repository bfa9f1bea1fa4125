import { FulcraError } from '../core/data';
import type { Rng } from '../numerics/rng';

/**
 * Assigns each row to one of k folds (0 … k−1), stratified by outcome: events and non-events are shuffled
 * separately (Fisher–Yates with the given seeded generator) and dealt round-robin, continuing the deal from
 * one class to the next, so fold sizes differ by at most one and every fold gets its share of events.
 * Rows with weight 0 get fold −1 (they are in no fold).
 */
export function stratifiedFolds(y: Float64Array, k: number, rng: Rng, weights?: Float64Array): Int32Array {
  if (!Number.isInteger(k) || k < 2)
    throw new FulcraError('bad-folds', `The number of folds must be a whole number ≥ 2; got ${k}.`);
  const events: number[] = [],
    nonEvents: number[] = [];
  for (let i = 0; i < y.length; i++) {
    if (weights && !(weights[i] > 0)) continue;
    (y[i] === 1 ? events : nonEvents).push(i);
  }
  const n = events.length + nonEvents.length;
  if (k > n) throw new FulcraError('bad-folds', `${k} folds need at least ${k} rows; there are ${n}.`);
  const fold = new Int32Array(y.length).fill(-1);
  let next = rng.int(k);
  for (const group of [events, nonEvents]) {
    shuffle(group, rng);
    for (const i of group) {
      fold[i] = next;
      next = (next + 1) % k;
    }
  }
  return fold;
}

/** In-place Fisher–Yates shuffle. */
export function shuffle<T>(a: T[], rng: Rng): T[] {
  for (let i = a.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    const t = a[i];
    a[i] = a[j];
    a[j] = t;
  }
  return a;
}

/** Number of folds used in a fold assignment (largest index + 1), checking every fold is non-empty. */
export function countFolds(fold: Int32Array): number {
  let k = 0;
  for (let i = 0; i < fold.length; i++) k = Math.max(k, fold[i] + 1);
  const size = new Int32Array(k);
  for (let i = 0; i < fold.length; i++) if (fold[i] >= 0) size[fold[i]]++;
  if (k < 2) throw new FulcraError('bad-folds', 'A fold assignment needs at least two folds.');
  for (let f = 0; f < k; f++) if (size[f] === 0) throw new FulcraError('bad-folds', `Fold ${f + 1} has no rows.`);
  return k;
}
