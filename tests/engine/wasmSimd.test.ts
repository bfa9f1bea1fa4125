import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { accumulateXtWX, addXtrBlock, blockedXtr, logisticRows, ROW_BLOCK } from '../../src/engine/numerics/kernels';
import { createRng } from '../../src/engine/numerics/rng';
import {
  createWasmRowKernels,
  sleb128,
  uleb128,
  wasmRowKernelBytes,
  wasmSimdSupported,
} from '../../src/engine/numerics/wasmSimd';

// The reference throughout is the project's own TypeScript kernels (src/engine/numerics/kernels.ts).

function randomData(n: number, p: number, seed: number) {
  const rng = createRng(seed);
  return {
    X: Float64Array.from({ length: n * p }, () => rng.normal()),
    w: Float64Array.from({ length: n }, () => rng.next()),
    r: Float64Array.from({ length: n }, () => rng.normal()),
    y: Float64Array.from({ length: n }, () => (rng.next() < 0.4 ? 1 : 0)),
    beta: Float64Array.from({ length: p }, () => rng.normal()),
  };
}

const relGap = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let scale = 0,
    gap = 0;
  for (let i = 0; i < b.length; i++) {
    scale = Math.max(scale, Math.abs(b[i]));
    gap = Math.max(gap, Math.abs(a[i] - b[i]));
  }
  return scale > 0 ? gap / scale : gap;
};

/** The TypeScript kernels over rows [a, b): η (logisticRows, no offset), X'r (addXtrBlock), X'WX. */
function reference(d: ReturnType<typeof randomData>, n: number, p: number, a: number, b: number) {
  const eta = new Float64Array(n);
  logisticRows(
    d.X,
    n,
    p,
    d.y,
    d.beta,
    undefined,
    undefined,
    eta,
    undefined,
    new Float64Array(n),
    new Float64Array(p),
    a,
    b,
  );
  const g = new Float64Array(p);
  addXtrBlock(d.X, n, p, d.r, a, b, g);
  const H = accumulateXtWX(d.X, n, p, d.w, new Float64Array(p * p), new Float64Array(ROW_BLOCK * p), a, b);
  return { eta: eta.subarray(a, b), g, H };
}

/** Shapes for every remainder: p mod 2 and mod 4; n across the 256-, 512- and 2048-row blocks, odd and even. */
const shapes: [number, number][] = [
  [1, 1],
  [2, 2],
  [7, 3],
  [ROW_BLOCK + 1, 5],
  [513, 4],
  [1000, 6],
  [2049, 7],
  [3 * ROW_BLOCK - 7, 9],
  [2500, 12],
  [5001, 13],
];

describe('LEB128 emitter', () => {
  // DWARF Debugging Information Format, version 4, §7.6, Figures 22 and 23 (the encoding WebAssembly uses).
  it.each([
    [2, [0x02]],
    [127, [0x7f]],
    [128, [0x80, 0x01]],
    [129, [0x81, 0x01]],
    [130, [0x82, 0x01]],
    [12857, [0xb9, 0x64]],
  ])('writes unsigned %i as DWARF 4 Figure 22 does', (v, bytes) => expect(uleb128(v)).toEqual(bytes));
  it.each([
    [2, [0x02]],
    [-2, [0x7e]],
    [127, [0xff, 0x00]],
    [-127, [0x81, 0x7f]],
    [128, [0x80, 0x01]],
    [-128, [0x80, 0x7f]],
    [129, [0x81, 0x01]],
    [-129, [0xff, 0x7e]],
  ])('writes signed %i as DWARF 4 Figure 23 does', (v, bytes) => expect(sleb128(v)).toEqual(bytes));
  it('round-trips the 32-bit extremes', () => {
    expect(uleb128(2 ** 32 - 1)).toEqual([0xff, 0xff, 0xff, 0xff, 0x0f]);
    expect(sleb128(-(2 ** 31))).toEqual([0x80, 0x80, 0x80, 0x80, 0x78]);
  });
});

describe('WebAssembly SIMD row kernels', () => {
  it('emits a module this engine validates, starting with the WebAssembly magic and version 1', () => {
    const bytes = wasmRowKernelBytes();
    expect(Array.from(bytes.subarray(0, 8))).toEqual([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00]);
    expect(WebAssembly.validate(bytes)).toBe(true);
    expect(wasmSimdSupported()).toBe(true);
  });

  it.each(shapes)('agrees with kernels.ts over all rows (n = %i, p = %i)', (n, p) => {
    const d = randomData(n, p, n * 31 + p);
    const k = createWasmRowKernels(d.X, n, p);
    const ref = reference(d, n, p, 0, n);
    // Xβ adds in the same order as kernels.ts (four columns a pass, no fused multiply-add): the same bits.
    expect(Array.from(k.xbeta(d.beta))).toEqual(Array.from(ref.eta));
    expect(relGap(k.xtr(d.r, new Float64Array(p)), blockedXtr(d.X, n, p, d.r, new Float64Array(p)))).toBeLessThan(
      1e-12,
    );
    expect(relGap(k.xtwx(d.w, new Float64Array(p * p)), ref.H)).toBeLessThan(1e-12);
  });

  it('works on rows [a, b) only and writes no η outside them', () => {
    const n = 3001,
      p = 11;
    const d = randomData(n, p, 8);
    const k = createWasmRowKernels(d.X, n, p);
    k.w.set(d.w);
    k.r.set(d.r);
    for (const [a, b] of [
      [0, 1],
      [5, 6],
      [17, 530],
      [1000, 3001],
      [2999, 3001],
      [700, 700],
    ]) {
      const ref = reference(d, n, p, a, b);
      k.eta.fill(NaN);
      k.xbeta(d.beta, a, b);
      expect(Array.from(k.eta.subarray(a, b))).toEqual(Array.from(ref.eta));
      if (a > 0) expect(k.eta[a - 1]).toBeNaN();
      if (b < n) expect(k.eta[b]).toBeNaN();
      expect(relGap(k.xtr(k.r, new Float64Array(p), a, b), ref.g)).toBeLessThan(1e-12);
      const H = k.xtwx(k.w, new Float64Array(p * p), a, b);
      expect(relGap(H, ref.H)).toBeLessThan(1e-12);
      for (let j = 0; j < p; j++) for (let c = 0; c < p; c++) expect(H[j * p + c]).toBe(H[c * p + j]);
    }
  });

  it('agrees with kernels.ts on random shapes and row ranges (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.record({
          n: fc.integer({ min: 1, max: 1200 }),
          p: fc.integer({ min: 1, max: 14 }),
          u: fc.double({ min: 0, max: 1, noNaN: true }),
          v: fc.double({ min: 0, max: 1, noNaN: true }),
          seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        }),
        ({ n, p, u, v, seed }) => {
          const a = Math.floor(Math.min(u, v) * n),
            b = Math.max(a, Math.ceil(Math.max(u, v) * n));
          const d = randomData(n, p, seed);
          const k = createWasmRowKernels(d.X, n, p);
          const ref = reference(d, n, p, a, b);
          expect(Array.from(k.xbeta(d.beta, a, b).subarray(a, b))).toEqual(Array.from(ref.eta));
          expect(relGap(k.xtr(d.r, new Float64Array(p), a, b), ref.g)).toBeLessThan(1e-12);
          expect(relGap(k.xtwx(d.w, new Float64Array(p * p), a, b), ref.H)).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 60, seed: 17 },
    );
  });

  it('refuses a design shorter than n·p and rows outside [0, n)', () => {
    expect(() => createWasmRowKernels(new Float64Array(5), 3, 2)).toThrow(FulcraError);
    const k = createWasmRowKernels(new Float64Array(6), 3, 2);
    expect(() => k.xtr(new Float64Array(3), new Float64Array(2), 1, 4)).toThrow(/not within/);
    expect(() => k.xbeta([1, 2], 2, 1)).toThrow(/not within/);
  });
});
