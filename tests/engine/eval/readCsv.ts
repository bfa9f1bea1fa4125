import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

/** Reads a numeric fixture CSV (lines starting with # are comments) into named Float64Array columns. */
export function readNumericCsv(relPath: string): Record<string, Float64Array> {
  const lines = readFileSync(resolve(__dirname, '../../fixtures', relPath), 'utf8')
    .split(/\r?\n/)
    .filter((l) => l && !l.startsWith('#'));
  const names = lines[0].split(',').map((s) => s.replace(/"/g, ''));
  const cols: Record<string, Float64Array> = {};
  names.forEach((n) => (cols[n] = new Float64Array(lines.length - 1)));
  for (let r = 1; r < lines.length; r++) {
    const cells = lines[r].split(',');
    names.forEach((n, j) => (cols[n][r - 1] = Number(cells[j])));
  }
  return cols;
}

// Untyped by default: each test reads the fields of its reference fixture; pass T to check them.
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- fixtures are JSON written by R/Python scripts
export function readJson<T = any>(relPath: string): T {
  return JSON.parse(readFileSync(resolve(__dirname, '../../fixtures', relPath), 'utf8')) as T;
}
