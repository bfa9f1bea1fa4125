import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readFileSync,
  readSync,
  renameSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { join } from 'node:path';
import { createRng } from '../../engine/numerics';

/** A synthetic benchmark data set on disk: CSV (x1..xp, y) plus the same values as raw float64 files. */
export interface SynthFiles {
  n: number;
  /** Number of predictors (the design adds an intercept column). */
  p: number;
  seed: number;
  csv: string;
  /** Column-major n×p predictors, little-endian float64. */
  xBin: string;
  /** Length-n outcome 0/1, float64. */
  yBin: string;
  /** True coefficients, intercept first (length p + 1). */
  trueBeta: number[];
  csvBytes: number;
  eventRate: number;
}

/**
 * True coefficients: intercept −1.2, slopes c·(−1)^j/√j scaled so that Σβ_j² = 2 (linear predictor sd ≈ 1.4,
 * about 30 % events) — a moderate, well-separated signal so every solver converges.
 */
export function trueCoefficients(p: number): Float64Array {
  const b = new Float64Array(p + 1);
  b[0] = -1.2;
  let ss = 0;
  for (let j = 1; j <= p; j++) ss += 1 / j;
  const c = Math.sqrt(2 / ss);
  for (let j = 1; j <= p; j++) b[j] = (c * (j % 2 ? 1 : -1)) / Math.sqrt(j);
  return b;
}

/**
 * Seeded synthetic data: predictors N(0, 1) rounded to 4 decimals (so CSV text round-trips exactly and every
 * reader sees the same doubles), y ~ Bernoulli(logistic(Xβ)). Returns column-major predictors without intercept.
 */
export function synthesise(
  n: number,
  p: number,
  seed: number,
): { X: Float64Array; y: Float64Array; beta: Float64Array } {
  const rng = createRng(seed);
  const beta = trueCoefficients(p);
  const X = new Float64Array(n * p);
  const eta = new Float64Array(n).fill(beta[0]);
  for (let j = 0; j < p; j++) {
    const o = j * n,
      b = beta[j + 1];
    for (let i = 0; i < n; i++) {
      const v = Math.round(rng.normal() * 1e4) / 1e4;
      X[o + i] = v;
      eta[i] += b * v;
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = rng.next() < 1 / (1 + Math.exp(-eta[i])) ? 1 : 0;
  return { X, y, beta };
}

const text4: string[] = [];
/** Text of a multiple of 1e-4 (as made by synthesise); same double when parsed back. Memoised: String() is slow. */
function decimal4(v: number): string {
  const k = Math.round(v * 1e4);
  const key = k + 200000;
  if (key >= 0 && key < 400000) {
    const hit = text4[key];
    if (hit !== undefined) return hit;
    return (text4[key] = String(k / 1e4));
  }
  return String(k / 1e4);
}

function writeCsv(path: string, X: Float64Array, y: Float64Array, n: number, p: number): number {
  const fd = openSync(path, 'w');
  let bytes = 0;
  try {
    const header = [...Array.from({ length: p }, (_, j) => `x${j + 1}`), 'y'].join(',') + '\n';
    bytes += writeSync(fd, header);
    const rowsPerChunk = 20000;
    for (let r0 = 0; r0 < n; r0 += rowsPerChunk) {
      const lines: string[] = [];
      const r1 = Math.min(n, r0 + rowsPerChunk);
      for (let i = r0; i < r1; i++) {
        let s = '';
        for (let j = 0; j < p; j++) s += decimal4(X[j * n + i]) + ',';
        lines.push(s + y[i]);
      }
      bytes += writeSync(fd, lines.join('\n') + '\n');
    }
  } finally {
    closeSync(fd);
  }
  return bytes;
}

function writeBin(path: string, a: Float64Array): void {
  const fd = openSync(path, 'w');
  try {
    const chunk = 1 << 24;
    const u8 = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
    for (let o = 0; o < u8.length; o += chunk) writeSync(fd, u8, o, Math.min(chunk, u8.length - o));
  } finally {
    closeSync(fd);
  }
}

/** Reads a raw float64 file into `out` (or a new array), without an intermediate copy. */
export function readBin(path: string, out?: Float64Array): Float64Array {
  const fd = openSync(path, 'r');
  try {
    const dst = out ?? new Float64Array(readFileSync(path).byteLength / 8);
    const u8 = new Uint8Array(dst.buffer, dst.byteOffset, dst.byteLength);
    let off = 0;
    while (off < u8.length) {
      const got = readSync(fd, u8, off, Math.min(1 << 24, u8.length - off), off);
      if (got <= 0) throw new Error(`${path} is shorter than expected (${off} of ${u8.length} bytes).`);
      off += got;
    }
    return dst;
  } finally {
    closeSync(fd);
  }
}

/** Generates the data set once into `dir` (kept between runs; the name records n, p and seed). */
export function ensureSynth(dir: string, n: number, p: number, seed: number): SynthFiles {
  mkdirSync(dir, { recursive: true });
  const base = join(dir, `synth-n${n}-p${p}-s${seed}`);
  const meta = `${base}.json`;
  if (existsSync(meta)) return JSON.parse(readFileSync(meta, 'utf8')) as SynthFiles;
  const { X, y, beta } = synthesise(n, p, seed);
  const csvBytes = writeCsv(`${base}.csv`, X, y, n, p);
  writeBin(`${base}.x.f64`, X);
  writeBin(`${base}.y.f64`, y);
  let ev = 0;
  for (let i = 0; i < n; i++) ev += y[i];
  const files: SynthFiles = {
    n,
    p,
    seed,
    csv: `${base}.csv`,
    xBin: `${base}.x.f64`,
    yBin: `${base}.y.f64`,
    trueBeta: Array.from(beta),
    csvBytes,
    eventRate: ev / n,
  };
  writeFileSync(`${meta}.tmp`, JSON.stringify(files, null, 1));
  renameSync(`${meta}.tmp`, meta);
  return files;
}
