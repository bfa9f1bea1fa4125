import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { createRng } from '../../../src/engine/numerics/rng';

/** Known model for simulations: logit P(y = 1) = −1 + 0.8·x1 − 0.5·x2 + 0.3·x3, x ~ N(0, 1) independent. */
export const TRUE_BETA = [-1, 0.8, -0.5, 0.3];

export function simulate(n: number, seed: number, noise = 0): { data: Dataset; spec: ModelSpec } {
  const rng = createRng(seed);
  const p = TRUE_BETA.length - 1 + noise;
  const xs = Array.from({ length: p }, () => new Float64Array(n));
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let eta = TRUE_BETA[0];
    for (let j = 0; j < p; j++) {
      xs[j][i] = rng.normal();
      if (j + 1 < TRUE_BETA.length) eta += TRUE_BETA[j + 1] * xs[j][i];
    }
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  const names = xs.map((_, j) => `x${j + 1}`);
  return {
    data: {
      nRows: n,
      columns: [
        { kind: 'numeric', name: 'y', values: y },
        ...xs.map((values, j) => ({ kind: 'numeric' as const, name: names[j], values })),
      ],
    },
    spec: { outcome: 'y', terms: names.map((column) => ({ type: 'main' as const, column })) },
  };
}
