import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Dataset } from '../../../src/engine/core/data';

const root = fileURLToPath(new URL('../../../', import.meta.url));

// Untyped by default: each test reads the fields of its reference fixture; pass T to check them.
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- fixtures are JSON written by R/Python scripts
export function readJson<T = any>(rel: string): T {
  return JSON.parse(readFileSync(root + rel, 'utf8')) as T;
}

/** Reads a simple numeric CSV (quoted header, no quoted cells); `categorical` columns become level codes. */
export function readCsvDataset(rel: string, categorical: string[] = []): Dataset {
  const lines = readFileSync(root + rel, 'utf8')
    .trim()
    .split(/\r?\n/);
  const header = lines[0].split(',').map((h) => h.replace(/"/g, ''));
  const rows = lines.slice(1).map((l) => l.split(',').map((c) => c.replace(/"/g, '')));
  const nRows = rows.length;
  const columns = header.map((name, j) => {
    if (categorical.includes(name)) {
      const levels = [...new Set(rows.map((r) => r[j]).filter((v) => v !== 'NA' && v !== ''))].sort();
      const codes = Int32Array.from(rows, (r) => levels.indexOf(r[j]));
      return { kind: 'categorical' as const, name, codes, levels };
    }
    return {
      kind: 'numeric' as const,
      name,
      values: Float64Array.from(rows, (r) => (r[j] === 'NA' || r[j] === '' ? NaN : Number(r[j]))),
    };
  });
  return { nRows, columns };
}

/** Column-major design from row arrays. */
export function designFromRows(rows: number[][]): { X: Float64Array; n: number; p: number } {
  const n = rows.length,
    p = rows[0].length;
  const X = new Float64Array(n * p);
  rows.forEach((r, i) => r.forEach((v, j) => (X[j * n + i] = v)));
  return { X, n, p };
}

export function maxRelErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < b.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]) / Math.max(Math.abs(b[i]), 1e-300));
  return m;
}

export function maxAbsErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < b.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}
