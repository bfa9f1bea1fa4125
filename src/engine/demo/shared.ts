import type { CategoricalColumn, Dataset, NumericColumn } from '../core/data';
import type { ModelSpec } from '../core/model';
import type { Rng } from '../numerics/rng';

/** One true coefficient of an invented scenario: per unit of a numeric column, or a level against the reference. */
export interface TrueCoefficient {
  column: string | null;
  level?: string;
  value: number;
}

/** An invented demo: the data, the model it was generated from and the truth, all labelled as invented. */
export interface DemoScenario {
  id: string;
  title: string;
  /** Says plainly that the data are invented. */
  notice: string;
  dataset: Dataset;
  spec: ModelSpec;
  /** Intercept (column null) first, then per term; levels against the spec's reference level. */
  truth: TrueCoefficient[];
  seed: number;
}

export function numeric(name: string, values: Float64Array): NumericColumn {
  return { kind: 'numeric', name, values };
}

export function categorical(name: string, levels: string[], codes: Int32Array): CategoricalColumn {
  return { kind: 'categorical', name, levels, codes };
}

/** Draws a level index with the given probabilities (summing to 1). */
export function drawLevel(rng: Rng, probs: readonly number[]): number {
  const u = rng.next();
  let acc = 0;
  for (let k = 0; k < probs.length; k++) {
    acc += probs[k];
    if (u < acc) return k;
  }
  return probs.length - 1;
}

export function clamp(x: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, x));
}

export function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}

export function bernoulliLogit(rng: Rng, eta: number): boolean {
  return rng.next() < 1 / (1 + Math.exp(-eta));
}

/** Sets a fraction of cells missing completely at random (after the outcome has been drawn). */
export function punchMissing(rng: Rng, col: NumericColumn | CategoricalColumn, fraction: number): void {
  const n = col.kind === 'numeric' ? col.values.length : col.codes.length;
  for (let i = 0; i < n; i++) {
    if (rng.next() < fraction) {
      if (col.kind === 'numeric') col.values[i] = NaN;
      else col.codes[i] = -1;
    }
  }
}
