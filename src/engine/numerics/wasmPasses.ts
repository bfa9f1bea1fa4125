/**
 * The logistic row passes of kernels.ts (logisticRows, logisticRowsPair, logisticRowsOne) with Xβ and X'r done by
 * the WebAssembly SIMD kernels of wasmSimd.ts, for a design that lives in a WebAssembly memory (rowPool.ts
 * allocDesign). The row maths between the two (e^−|η|, μ, residuals, weights, loss) of unweighted rows is the SIMD
 * kernel rowmaths, which repeats kernels.ts unitRows operation for operation (its e^x included); case-weighted rows
 * keep the TypeScript. Xβ adds the columns in kernels.ts's order, and X'r keeps even and odd rows apart as kernels.ts
 * addXtrBlockLanes does, so every loss, score, η and weight is bit-for-bit what kernels.ts gives: the kernels change
 * the speed only (tests/engine/wasmPasses.test.ts). A host without WebAssembly SIMD, or whose policy forbids
 * compiling it, gets plain arrays and kernels.ts, with the same numbers.
 *
 * The information X'WX likewise (kernels.ts accumulateXtWX's tiles and blocks, its sums kept by lanes as here).
 *
 * Memory: the design X (column-major n×p) at byte 0, then one scratch slot per thread (512-row blocks of η and
 * residuals for two vectors, two coefficient vectors and two scores; a chunk's weights, w∘X of a row block and a
 * p×p sum for X'WX; a block of y and the row maths' four lane sums). A row pool's threads instantiate the module on
 * the same shared memory and each works in its own slot (its index in the pool).
 */
import { blockRowMaths, closeLanes, ROW_BLOCK, unitRows } from './kernels';
import { wasmRowModule } from './wasmSimd';

/** Rows per block, as kernels.ts's logistic passes. */
const R = 512;
/** Most rows of one X'WX call (a row pool's chunk): their weights are copied into the slot first. */
export const WASM_XTWX_ROWS = 8_192;
/** Coefficient vectors taken together on each block of rows (more go in groups of this many). */
const MAX_VEC = 8;

/** A design in a WebAssembly memory, as it travels with a row pool's job (the memory is shared then). */
export interface WasmLayout {
  memory: WebAssembly.Memory;
  shared: boolean;
  /** Tells the designs apart in a thread's cache of instances. */
  id: number;
  n: number;
  p: number;
  /** Byte offset of slot 0 and bytes per slot. */
  scratch: number;
  slotBytes: number;
  slots: number;
}

type Kernel = (...a: number[]) => void;
type Exports = { xbeta: Kernel; xtr: Kernel; xtwx: Kernel; rowmaths: Kernel };
interface Instance {
  id: number;
  ex: Exports;
  heap: Float64Array;
}

let support: boolean | null = null;

/** Whether this thread can compile the kernels (WebAssembly SIMD, and a policy that allows WebAssembly). */
export function wasmPassesSupported(): boolean {
  if (support === null) {
    try {
      support = typeof WebAssembly === 'object' && wasmRowModule(false) instanceof WebAssembly.Module;
    } catch {
      support = false;
    }
  }
  return support;
}

const pad16 = (bytes: number) => Math.ceil(bytes / 16) * 16;
/**
 * A slot's areas (byte offsets from its start) for p columns, and its size: one layout for both, so they cannot
 * disagree. η and residual blocks of 512 rows (two each); MAX_VEC coefficient vectors and their scores; a chunk's
 * weights, w∘X of a row block and a p×p sum for X'WX (also Cᵀ for the influence measures); V = X·C, 512 rows a
 * column.
 */
function slotAreas(p: number) {
  const vb = pad16(8 * p);
  let at = 0;
  const take = (bytes: number) => {
    const o = at;
    at += pad16(bytes);
    return o;
  };
  const ea = take(R * 8),
    eb = take(R * 8),
    ra = take(R * 8),
    rb = take(R * 8),
    ba = take(MAX_VEC * vb),
    ga = take(MAX_VEC * vb),
    w = take(8 * WASM_XTWX_ROWS),
    work = take(8 * ROW_BLOCK * p),
    acc = take(8 * p * p),
    v = take(8 * R * p),
    y = take(R * 8),
    lanes = take(32);
  return { ea, eb, ra, rb, ba, bb: ba + vb, ga, gb: ga + vb, w, work, acc, v, y, lanes, vb, bytes: at };
}
const slotBytesOf = (p: number) => slotAreas(p).bytes;

/** Largest design placed in a WebAssembly memory: addresses stay below 2³¹ (the kernels' i32 arithmetic). */
const MAX_BYTES = 2 ** 31 - 65536;

/**
 * A zeroed n×p design in a new WebAssembly memory with `slots` scratch slots (shared: for a row pool's threads),
 * or null when it cannot be had (no SIMD, too large, the engine refuses the memory).
 */
export function createWasmDesign(n: number, p: number, shared: boolean, slots: number): WasmLayout | null {
  if (!wasmPassesSupported() || n < 1 || p < 1 || 8 * n > MAX_BYTES) return null;
  const scratch = pad16(8 * n * p),
    slotBytes = slotBytesOf(p);
  const bytes = scratch + slots * slotBytes;
  if (bytes > MAX_BYTES) return null;
  const pages = Math.ceil(bytes / 65536);
  try {
    const memory = shared
      ? new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true })
      : new WebAssembly.Memory({ initial: pages });
    const L: WasmLayout = { memory, shared, id: Math.random(), n, p, scratch, slotBytes, slots };
    instanceFor(L);
    return L;
  } catch {
    // Out of address space for another memory, or shared memory not allowed here: plain arrays instead.
    return null;
  }
}

/**
 * This thread's instances of the last few designs it worked on, held weakly: a cached instance must not keep a
 * design's memory (tens of megabytes) alive after the engine has let the design go; a collected one is made again.
 */
const cache: { id: number; ref: WeakRef<Instance> }[] = [];
const CACHE = 3;

function instanceFor(L: WasmLayout): Instance {
  const k = cache.findIndex((c) => c.id === L.id);
  const hit = k >= 0 ? cache[k].ref.deref() : undefined;
  if (hit) return hit;
  if (k >= 0) cache.splice(k, 1);
  const inst = new WebAssembly.Instance(wasmRowModule(L.shared), { env: { memory: L.memory } });
  const c: Instance = {
    id: L.id,
    ex: inst.exports as unknown as Exports,
    heap: new Float64Array(L.memory.buffer),
  };
  cache.unshift({ id: L.id, ref: new WeakRef(c) });
  if (cache.length > CACHE) cache.length = CACHE;
  return c;
}

/** The slot's arrays as views (f64 indices into the heap) and byte offsets. */
function slotOf(L: WasmLayout, slot: number) {
  const base = L.scratch + slot * L.slotBytes,
    r = slotAreas(L.p);
  if (r.bytes > L.slotBytes) throw new Error(`A ${L.p}-column slot does not fit the design's slots.`);
  return {
    ea: base + r.ea,
    eb: base + r.eb,
    ra: base + r.ra,
    rb: base + r.rb,
    /** coefficient vector q at ba + q·vb, its score at ga + q·vb (q < MAX_VEC) */
    ba: base + r.ba,
    bb: base + r.bb,
    ga: base + r.ga,
    gb: base + r.gb,
    w: base + r.w,
    work: base + r.work,
    acc: base + r.acc,
    v: base + r.v,
    y: base + r.y,
    lanes: base + r.lanes,
    vb: r.vb,
  };
}

/**
 * kernels.ts blockRowMaths for the block of rows [r0, r0 + m) whose η is at byte `ea` of the slot's memory: residuals
 * to byte `ra`, weights into w (rows r0 …) when given. Unweighted rows by the SIMD kernel (its whole pairs of rows,
 * then unitRows for an odd last one); case-weighted ones by the TypeScript. Same bits either way.
 */
function rowMaths(
  { ex, heap }: Instance,
  s: ReturnType<typeof slotOf>,
  ea: number,
  y: Float64Array,
  r0: number,
  m: number,
  c: Float64Array | undefined,
  ra: number,
  w: Float64Array | null,
  loss: number,
): number {
  if (c) return blockRowMaths(heap, ea / 8, y, r0, c, m, heap, ra / 8, w, r0, loss);
  const yo = s.y / 8,
    wo = s.w / 8,
    lo = s.lanes / 8,
    pairs = m & ~1;
  heap.set(y.subarray(r0, r0 + m), yo);
  ex.rowmaths(ea, s.y, ra, w ? s.w : 0, 8 * pairs, s.lanes);
  unitRows(heap, ea / 8, heap, yo, pairs, m, heap, ra / 8, w ? heap : null, wo, heap, lo);
  if (w) w.set(heap.subarray(wo, wo + m), r0);
  return closeLanes(heap, lo, loss);
}

/**
 * kernels.ts logisticRows over rows [rowStart, rowEnd) in `slot`: fills eta and w there, g (cleared first) with
 * X'r, returns the loss. Same bits.
 */
export function wasmLogisticRows(
  L: WasmLayout,
  slot: number,
  y: Float64Array,
  beta: ArrayLike<number>,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  eta: Float64Array,
  w: Float64Array,
  g: Float64Array,
  rowStart: number,
  rowEnd: number,
): number {
  const { n, p } = L;
  const inst = instanceFor(L),
    { ex, heap } = inst;
  const s = slotOf(L, slot);
  const e0 = s.ea / 8,
    g0 = s.ga / 8;
  for (let j = 0; j < p; j++) heap[s.ba / 8 + j] = beta[j];
  heap.fill(0, g0, g0 + p);
  let loss = 0;
  for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
    const r1 = Math.min(rowEnd, r0 + R),
      m = r1 - r0;
    if (offset) for (let i = 0; i < m; i++) heap[e0 + i] = offset[r0 + i];
    else heap.fill(0, e0, e0 + m);
    ex.xbeta(r0 * 8, n * 8, p, s.ba, s.ea, 0, m);
    eta.set(heap.subarray(e0, e0 + m), r0);
    loss = rowMaths(inst, s, s.ea, y, r0, m, c, s.ra, w, loss);
    ex.xtr(r0 * 8, n * 8, p, s.ra, 0, m, s.ga);
  }
  for (let j = 0; j < p; j++) g[j] = heap[g0 + j];
  return loss;
}

/**
 * kernels.ts logisticRowsPair / logisticRowsOne for m coefficient vectors (B, vector q at q·p) over rows
 * [rowStart, rowEnd) in `slot`, all of them on each block of rows while it is in cache (in groups of MAX_VEC): the
 * losses into loss[q], the scores into G (vector q at q·p, cleared first). Per vector the same arithmetic as a pair's
 * half, so the same bits.
 */
export function wasmLogisticRowsAll(
  L: WasmLayout,
  slot: number,
  y: Float64Array,
  B: Float64Array,
  m: number,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  G: Float64Array,
  loss: Float64Array,
  rowStart: number,
  rowEnd: number,
): void {
  const { n, p } = L;
  const inst = instanceFor(L),
    { ex, heap } = inst;
  const s = slotOf(L, slot);
  const ea = s.ea / 8,
    vb8 = s.vb / 8;
  for (let q0 = 0; q0 < m; q0 += MAX_VEC) {
    const mq = Math.min(MAX_VEC, m - q0);
    for (let q = 0; q < mq; q++) {
      heap.set(B.subarray((q0 + q) * p, (q0 + q + 1) * p), s.ba / 8 + q * vb8);
      heap.fill(0, s.ga / 8 + q * vb8, s.ga / 8 + q * vb8 + p);
      loss[q0 + q] = 0;
    }
    for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
      const r1 = Math.min(rowEnd, r0 + R),
        m8 = r1 - r0;
      for (let q = 0; q < mq; q++) {
        if (offset) for (let i = 0; i < m8; i++) heap[ea + i] = offset[r0 + i];
        else heap.fill(0, ea, ea + m8);
        ex.xbeta(r0 * 8, n * 8, p, s.ba + q * s.vb, s.ea, 0, m8);
        loss[q0 + q] = rowMaths(inst, s, s.ea, y, r0, m8, c, s.ra, null, loss[q0 + q]);
        ex.xtr(r0 * 8, n * 8, p, s.ra, 0, m8, s.ga + q * s.vb);
      }
    }
    for (let q = 0; q < mq; q++) for (let j = 0; j < p; j++) G[(q0 + q) * p + j] = heap[s.ga / 8 + q * vb8 + j];
  }
}

/**
 * kernels.ts accumulateXtWX over rows [rowStart, rowEnd) (at most WASM_XTWX_ROWS) in `slot`: out (row-major p×p,
 * both triangles) = X'WX of those rows. Same bits.
 */
export function wasmInformation(
  L: WasmLayout,
  slot: number,
  w: Float64Array,
  rowStart: number,
  rowEnd: number,
  out: Float64Array,
): Float64Array {
  const { n, p } = L;
  const { ex, heap } = instanceFor(L);
  const s = slotOf(L, slot);
  const m = rowEnd - rowStart,
    acc = s.acc / 8;
  heap.set(w.subarray(rowStart, rowEnd), s.w / 8);
  heap.fill(0, acc, acc + p * p);
  ex.xtwx(rowStart * 8, n * 8, p, s.w, 0, m, s.work, s.acc);
  for (let j = 0; j < p; j++)
    for (let k = j; k < p; k++) {
      const v = heap[acc + j * p + k];
      out[j * p + k] = v;
      out[k * p + j] = v;
    }
  return out;
}

/**
 * V = X[r0..r0 + rows, ·]·C (rows ≤ 512; column c of V at c·512 of the returned view, as influenceKernel.ts keeps
 * it), one Xβ kernel call per column of C: the same sums, in the same order, as influenceRows' loops.
 */
export function wasmInfluenceV(L: WasmLayout, slot: number, C: Float64Array, r0: number, rows: number): Float64Array {
  const { n, p } = L;
  const { ex, heap } = instanceFor(L);
  const s = slotOf(L, slot);
  const ct = s.acc / 8,
    v = s.v / 8;
  // Cᵀ: row c holds column c of C, the coefficients of V's column c
  for (let c = 0; c < p; c++) for (let j = 0; j < p; j++) heap[ct + c * p + j] = C[j * p + c];
  heap.fill(0, v, v + R * p);
  for (let c = 0; c < p; c++) ex.xbeta(r0 * 8, n * 8, p, s.acc + 8 * c * p, s.v + 8 * c * R, 0, rows);
  return heap.subarray(v, v + R * p);
}

/** A thread's use of a design: the layout when this thread has a slot in it. */
export function wasmUsable(L: WasmLayout | undefined, slot: number): L is WasmLayout {
  return L !== undefined && slot < L.slots && wasmPassesSupported();
}
