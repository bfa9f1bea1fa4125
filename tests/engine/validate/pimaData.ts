import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/** MASS::Pima.tr / Pima.te as exported by tests/fixtures/reference/glmnet-pima.R (outcome type == 'Yes'). */
export const PREDICTORS = ['npreg', 'glu', 'bp', 'skin', 'bmi', 'ped', 'age'];

export function readPima(which: 'tr' | 'te'): {
  X: Float64Array;
  y: Float64Array;
  n: number;
  p: number;
  rows: Record<string, string>[];
} {
  const path = fileURLToPath(new URL(`../../fixtures/data/validate-pima-${which}.csv`, import.meta.url));
  const [head, ...lines] = readFileSync(path, 'utf8').trim().split('\n');
  const names = head.split(',');
  const rows = lines.map((l) => Object.fromEntries(l.split(',').map((v, k) => [names[k], v])));
  const n = rows.length,
    p = PREDICTORS.length;
  const X = new Float64Array(n * p),
    y = new Float64Array(n);
  rows.forEach((r, i) => {
    PREDICTORS.forEach((c, j) => (X[j * n + i] = Number(r[c])));
    y[i] = r.type === 'Yes' ? 1 : 0;
  });
  return { X, y, n, p, rows };
}

export function readFixture<T>(name: string): T {
  const path = fileURLToPath(new URL(`../../fixtures/reference/${name}`, import.meta.url));
  return JSON.parse(readFileSync(path, 'utf8')) as T;
}

/** Pima.tr / Pima.te as a Dataset: numeric predictors, categorical outcome "type" (No/Yes). */
export function pimaDataset(which: 'tr' | 'te'): import('../../../src/engine/core/data').Dataset {
  const { X, y, n } = readPima(which);
  return {
    nRows: n,
    columns: [
      ...PREDICTORS.map((name, j) => ({ kind: 'numeric' as const, name, values: X.slice(j * n, (j + 1) * n) })),
      { kind: 'categorical' as const, name: 'type', codes: Int32Array.from(y), levels: ['No', 'Yes'] },
    ],
  };
}

export const PIMA_SPEC = {
  outcome: 'type',
  event: 'Yes',
  terms: PREDICTORS.map((column) => ({ type: 'main' as const, column })),
};
