import fc from 'fast-check';
import type { Column, Dataset } from '../../src/engine/core/data';
import type { ModelSpec, TermSpec } from '../../src/engine/core/model';
import { createRng } from '../../src/engine/numerics/rng';

/** What a generated predictor column is made of; the problem it plants (if any) is in its name. */
export type PredictorKind =
  | { kind: 'normal'; scale: number; shift: number }
  | { kind: 'huge-range' }
  | { kind: 'constant'; value: number }
  | { kind: 'all-missing' }
  | { kind: 'some-missing'; share: number }
  | { kind: 'duplicate'; of: number }
  | { kind: 'categorical'; levels: number; missing: boolean }
  | { kind: 'single-level' }
  | { kind: 'separator' };

export type OutcomeKind = 'random' | 'one-class' | 'rare' | 'labelled';

export interface EngineCase {
  n: number;
  seed: number;
  outcome: OutcomeKind;
  predictors: PredictorKind[];
  spline: boolean;
  interaction: boolean;
}

const MAGNITUDES = [1e-300, 1e-150, 1e-8, 1, 1e8, 1e150, 1e300];

const predictorKind: fc.Arbitrary<PredictorKind> = fc.oneof(
  {
    weight: 6,
    arbitrary: fc.record({
      kind: fc.constant('normal' as const),
      scale: fc.constantFrom(...MAGNITUDES),
      shift: fc.constantFrom(0, 1, -1e6, 1e300),
    }),
  },
  { weight: 1, arbitrary: fc.constant({ kind: 'huge-range' as const }) },
  {
    weight: 1,
    arbitrary: fc.record({ kind: fc.constant('constant' as const), value: fc.constantFrom(0, 1, -1e300, 1e-300) }),
  },
  { weight: 1, arbitrary: fc.constant({ kind: 'all-missing' as const }) },
  {
    weight: 1,
    arbitrary: fc.record({ kind: fc.constant('some-missing' as const), share: fc.constantFrom(0.1, 0.5, 0.95) }),
  },
  { weight: 2, arbitrary: fc.record({ kind: fc.constant('duplicate' as const), of: fc.nat(7) }) },
  {
    weight: 3,
    arbitrary: fc.record({
      kind: fc.constant('categorical' as const),
      levels: fc.integer({ min: 2, max: 6 }),
      missing: fc.boolean(),
    }),
  },
  { weight: 1, arbitrary: fc.constant({ kind: 'single-level' as const }) },
  { weight: 1, arbitrary: fc.constant({ kind: 'separator' as const }) },
);

export const engineCase: fc.Arbitrary<EngineCase> = fc.record({
  n: fc.integer({ min: 5, max: 200 }),
  seed: fc.integer({ min: 1, max: 2 ** 30 }),
  outcome: fc.constantFrom<OutcomeKind>('random', 'random', 'random', 'labelled', 'rare', 'one-class'),
  predictors: fc.array(predictorKind, { minLength: 1, maxLength: 8 }),
  spline: fc.boolean(),
  interaction: fc.boolean(),
});

/** Builds the dataset and a model using every predictor (plus an optional spline and interaction). */
export function buildCase(c: EngineCase): { data: Dataset; spec: ModelSpec; y01: Float64Array; event: string } {
  const rng = createRng(c.seed);
  const n = c.n;
  const y01 = new Float64Array(n);
  const rate = c.outcome === 'rare' ? 0 : 0.1 + 0.8 * rng.next();
  for (let i = 0; i < n; i++) y01[i] = c.outcome === 'one-class' ? 1 : rng.next() < rate ? 1 : 0;
  if (c.outcome === 'rare') y01[Math.floor(rng.next() * n)] = 1;
  const columns: Column[] = [];
  const outcomeCol: Column =
    c.outcome === 'labelled'
      ? { kind: 'categorical', name: 'outcome', levels: ['no', 'yes'], codes: Int32Array.from(y01, (v) => v) }
      : { kind: 'numeric', name: 'outcome', values: y01 };
  columns.push(outcomeCol);
  const predictors: Column[] = [];
  c.predictors.forEach((k, j) => {
    const name = `${k.kind}_${j}`;
    const values = new Float64Array(n);
    switch (k.kind) {
      case 'normal':
        for (let i = 0; i < n; i++) values[i] = k.shift + k.scale * rng.normal();
        break;
      case 'huge-range':
        for (let i = 0; i < n; i++)
          values[i] = (rng.next() < 0.5 ? 1e-300 : 1e300) * (rng.next() < 0.5 ? -1 : 1) * (1 + rng.next());
        break;
      case 'constant':
        values.fill(k.value);
        break;
      case 'all-missing':
        values.fill(NaN);
        break;
      case 'some-missing':
        for (let i = 0; i < n; i++) values[i] = rng.next() < k.share ? NaN : rng.normal();
        break;
      case 'separator':
        for (let i = 0; i < n; i++) values[i] = y01[i] + 0.4 * rng.next();
        break;
      case 'duplicate': {
        const src = predictors[k.of % Math.max(1, predictors.length)];
        if (src) {
          predictors.push({ ...src, name } as Column);
          return;
        }
        for (let i = 0; i < n; i++) values[i] = rng.normal();
        break;
      }
      case 'categorical': {
        const levels = Array.from({ length: k.levels }, (_, l) => `L${l}`);
        const codes = Int32Array.from({ length: n }, () =>
          k.missing && rng.next() < 0.1 ? -1 : Math.floor(rng.next() * k.levels),
        );
        predictors.push({ kind: 'categorical', name, levels, codes });
        return;
      }
      case 'single-level':
        predictors.push({ kind: 'categorical', name, levels: ['only'], codes: new Int32Array(n) });
        return;
    }
    predictors.push({ kind: 'numeric', name, values });
  });
  columns.push(...predictors);
  const terms: TermSpec[] = predictors.map((p) => ({ type: 'main', column: p.name }));
  const numeric = predictors.filter((p) => p.kind === 'numeric').map((p) => p.name);
  if (c.spline && numeric.length > 0) {
    const col = numeric[0];
    terms.splice(
      terms.findIndex((t) => t.type === 'main' && t.column === col),
      1,
      { type: 'spline', column: col, knots: 3 },
    );
  }
  if (c.interaction && predictors.length >= 2)
    terms.push({ type: 'interaction', columns: [predictors[0].name, predictors[1].name] });
  const spec: ModelSpec = { outcome: 'outcome', event: c.outcome === 'labelled' ? 'yes' : '1', terms };
  return { data: { nRows: n, columns }, spec, y01, event: spec.event! };
}
