/**
 * The row passes of kernels.ts — Xβ, X'r and X'WX over a column-major n×p design (column j at j·n), and the
 * logistic row maths between them — as WebAssembly SIMD (f64x2: two rows per instruction). The module's bytes are
 * written here by a small emitter (no .wasm file, no fetch, no eval) and compiled synchronously. The fit's passes
 * use them through wasmPasses.ts; `npm run bench` also times them alone against the TypeScript kernels
 * (src/cli/bench/wasmTrial.ts). Same maths and loop structure as kernels.ts: Xβ in 512-row blocks, four columns per
 * pass and the same order of additions (bit-for-bit equal); X'r in 2048-row blocks, four columns per pass; X'WX in
 * 256-row blocks of w∘X, upper triangle in 2×4 tiles. Sums of X'r and X'WX keep even and odd rows apart until each
 * block's end (one sum per SIMD lane), as kernels.ts's addXtrBlockLanes and accumulateXtWX do; the row maths
 * repeats unitRows's operations.
 */
import { FulcraError } from '../core/data';
import { EXP_MIN, EXP_TAYLOR, LN2_HI, LN2_LO, LOG2E, ROW_BLOCK } from './kernels';

type Code = number[];

/** Unsigned LEB128 of a non-negative integer below 2³² (WebAssembly core spec §5.2.2). */
export function uleb128(v: number): Code {
  const out: Code = [];
  do {
    let b = v % 128;
    v = Math.floor(v / 128);
    if (v > 0) b |= 0x80;
    out.push(b);
  } while (v > 0);
  return out;
}

/** Signed LEB128 of a 32-bit integer (WebAssembly core spec §5.2.2). */
export function sleb128(v: number): Code {
  const out: Code = [];
  for (;;) {
    const b = v & 0x7f;
    v >>= 7;
    const done = (v === 0 && (b & 0x40) === 0) || (v === -1 && (b & 0x40) !== 0);
    out.push(done ? b : b | 0x80);
    if (done) return out;
  }
}

const I32 = 0x7f,
  V128 = 0x7b;
const vec = (items: Code[]): Code => [...uleb128(items.length), ...items.flat()];
const name = (s: string): Code => vec([...s].map((c) => [c.charCodeAt(0)]));
const section = (id: number, body: Code): Code => [id, ...uleb128(body.length), ...body];

// Instructions as expressions: each helper returns the bytes that leave its value on the stack.
const get = (l: number): Code => [0x20, ...uleb128(l)];
const set = (l: number, v: Code): Code => [...v, 0x21, ...uleb128(l)];
const int = (v: number): Code => [0x41, ...sleb128(v)];
const op =
  (...o: number[]) =>
  (a: Code, b: Code): Code => [...a, ...b, ...o];
const add = op(0x6a),
  sub = op(0x6b),
  mul = op(0x6c),
  and = op(0x71),
  shl = op(0x74),
  ltU = op(0x49),
  leU = op(0x4d),
  fadd = op(0xa0),
  fmul = op(0xa2);
const simd = (o: number): Code => [0xfd, ...uleb128(o)];
const mem = (offset: number): Code => [3, ...uleb128(offset)]; // alignment hint 2³ bytes
const fload = (at: Code, off = 0): Code => [...at, 0x2b, ...mem(off)];
const fstore = (at: Code, v: Code, off = 0): Code => [...at, ...v, 0x39, ...mem(off)];
const vload = (at: Code): Code => [...at, ...simd(0x00), ...mem(0)];
/** The last row of an odd block: one f64 into lane 0, lane 1 zero, so the pair sums are unchanged. */
const vload0 = (at: Code): Code => [...at, ...simd(0x5d), ...mem(0)];
const vstore = (at: Code, v: Code): Code => [...at, ...v, ...simd(0x0b), ...mem(0)];
const vadd = (a: Code, b: Code): Code => [...a, ...b, ...simd(0xf0)];
const vmul = (a: Code, b: Code): Code => [...a, ...b, ...simd(0xf2)];
const splat = (v: Code): Code => [...v, ...simd(0x14)];
const lane = (v: Code, k: number): Code => [...v, ...simd(0x21), k];
const vzero: Code = [...simd(0x0c), ...new Array<number>(16).fill(0)];
const hsum = (v: Code): Code => fadd(lane(v, 0), lane(v, 1));
const vop =
  (o: number) =>
  (a: Code, b: Code): Code => [...a, ...b, ...simd(o)];
const vsub = vop(0xf1),
  vdiv = vop(0xf3),
  vlt = vop(0x49),
  vgt = vop(0x4a),
  vge = vop(0x4c),
  veq = vop(0x47);
const vabs = (a: Code): Code => [...a, ...simd(0xec)],
  vneg = (a: Code): Code => [...a, ...simd(0xed)],
  vfloor = (a: Code): Code => [...a, ...simd(0x75)];
/** Lanes of `a` where the mask is set, of `b` elsewhere (v128.bitselect). */
const pick = (mask: Code, a: Code, b: Code): Code => [...a, ...b, ...mask, ...simd(0x52)];
/** Each 64-bit lane shifted left by `bits` (i64x2.shl). */
const shl64 = (a: Code, bits: number): Code => [...a, ...int(bits), ...simd(0xcb)];
/** Both lanes the double v. */
const vconst = (v: number): Code => [...simd(0x0c), ...new Uint8Array(new Float64Array([v, v]).buffer)];
const min = (a: Code, b: Code): Code => [...a, ...b, ...ltU(a, b), 0x1b];
const when = (cond: Code, body: Code): Code => [...cond, 0x04, 0x40, ...body, 0x0b];
const whileDo = (cond: Code, body: Code): Code => [
  0x02,
  0x40,
  0x03,
  0x40,
  ...cond,
  0x45,
  0x0d,
  1,
  ...body,
  0x0c,
  0,
  0x0b,
  0x0b,
];
const forUp = (l: number, from: Code, to: Code, step: Code, body: Code): Code => [
  ...set(l, from),
  ...whileDo(ltU(get(l), to), [...body, ...set(l, add(get(l), step))]),
];

/** One function: its i32 parameters, then locals handed out in order. */
class Func {
  readonly types: number[] = [];
  constructor(readonly params: number) {}
  local(type: number): number {
    this.types.push(type);
    return this.params + this.types.length - 1;
  }
  locals(type: number, k: number): number[] {
    return Array.from({ length: k }, () => this.local(type));
  }
  encode(body: Code): Code {
    const code = [...vec(this.types.map((t) => [1, t])), ...body, 0x0b];
    return [...uleb128(code.length), ...code];
  }
}

/** Rows per block of the Xβ and X'r passes, as in kernels.ts (logisticRows, blockedXtr). */
const ETA_ROWS = 512,
  XTR_ROWS = 2048;

/**
 * Row-block frame shared by the three kernels: r0 steps over [a, b) by `rows`; m8 and e8 are the block's bytes
 * and those of its whole pairs of rows. `inner` is the block's work.
 */
function blocks(f: Func, a: number, b: number, rows: number, inner: (r0: number, m8: number, e8: number) => Code) {
  const [r0, m8, e8] = f.locals(I32, 3);
  return forUp(r0, get(a), get(b), int(rows), [
    ...set(m8, shl(sub(min(add(get(r0), int(rows)), get(b)), get(r0)), int(3))),
    ...set(e8, and(get(m8), int(-16))),
    ...inner(r0, m8, e8),
  ]);
}

/** A pass over the pairs of a block's rows (`o` in bytes), then the odd last row with lane 1 zero. */
const pairs = (o: number, m8: number, e8: number, body: (load: typeof vload) => Code): Code => [
  ...forUp(o, int(0), get(e8), int(16), body(vload)),
  ...when(ltU(get(e8), get(m8)), [...set(o, get(e8)), ...body(vload0)]),
];

/**
 * xbeta(X, n8, p, beta, eta, a, b): eta[a..b) += Xβ (n8 = 8n, addresses in bytes); the caller sets eta first (0, or
 * the offset), as kernels.ts does.
 */
function xbetaFunc(): Code {
  const f = new Func(7);
  const [X, n8, p, beta, eta, a, b] = [0, 1, 2, 3, 4, 5, 6];
  const [o, j, xb, eb, x1, x2, x3] = f.locals(I32, 7);
  const bv = f.locals(V128, 4);
  const xs = [xb, x1, x2, x3];
  const at = (base: number) => add(get(base), get(o));
  // The odd last row by scalar f64 ops: a v128 store there would write the row after the range.
  const row = (k: number, scalar: boolean): Code =>
    scalar ? fmul(lane(get(bv[k]), 0), fload(at(xs[k]))) : vmul(get(bv[k]), vload(at(xs[k])));
  const group = (cols: number, scalar: boolean): Code => {
    let t = row(0, scalar);
    for (let k = 1; k < cols; k++) t = (scalar ? fadd : vadd)(t, row(k, scalar));
    return scalar ? fstore(at(eb), fadd(fload(at(eb)), t)) : vstore(at(eb), vadd(vload(at(eb)), t));
  };
  const columns = (cols: number, m8: number, e8: number): Code => [
    ...set(x1, add(get(xb), get(n8))),
    ...set(x2, add(get(x1), get(n8))),
    ...set(x3, add(get(x2), get(n8))),
    ...[...Array(cols).keys()].flatMap((k) => set(bv[k], splat(fload(add(get(beta), shl(get(j), int(3))), 8 * k)))),
    ...forUp(o, int(0), get(e8), int(16), group(cols, false)),
    ...when(ltU(get(e8), get(m8)), [...set(o, get(e8)), ...group(cols, true)]),
    ...set(xb, add(get(xb), mul(get(n8), int(cols)))),
    ...set(j, add(get(j), int(cols))),
  ];
  return f.encode(
    blocks(f, a, b, ETA_ROWS, (r0, m8, e8) => [
      ...set(eb, add(get(eta), shl(get(r0), int(3)))),
      ...set(xb, add(get(X), shl(get(r0), int(3)))),
      ...set(j, int(0)),
      ...whileDo(leU(add(get(j), int(4)), get(p)), columns(4, m8, e8)),
      ...whileDo(ltU(get(j), get(p)), columns(1, m8, e8)),
    ]),
  );
}

/** xtr(X, n8, p, r, a, b, g): g += X[a..b, ·]'r[a..b). */
function xtrFunc(): Code {
  const f = new Func(7);
  const [X, n8, p, r, a, b, g] = [0, 1, 2, 3, 4, 5, 6];
  const [o, j, xb, rb, x1, x2, x3] = f.locals(I32, 7);
  const s = f.locals(V128, 4);
  const [rv] = f.locals(V128, 1);
  const xs = [xb, x1, x2, x3];
  const columns = (cols: number, m8: number, e8: number): Code => [
    ...set(x1, add(get(xb), get(n8))),
    ...set(x2, add(get(x1), get(n8))),
    ...set(x3, add(get(x2), get(n8))),
    ...s.flatMap((l) => set(l, vzero)),
    ...pairs(o, m8, e8, (load) => [
      ...set(rv, load(add(get(rb), get(o)))),
      ...s.slice(0, cols).flatMap((l, k) => set(l, vadd(get(l), vmul(load(add(get(xs[k]), get(o))), get(rv))))),
    ]),
    ...s.slice(0, cols).flatMap((l, k) => {
      const gj = add(get(g), shl(get(j), int(3)));
      return fstore(gj, fadd(fload(gj, 8 * k), hsum(get(l))), 8 * k);
    }),
    ...set(xb, add(get(xb), mul(get(n8), int(cols)))),
    ...set(j, add(get(j), int(cols))),
  ];
  return f.encode(
    blocks(f, a, b, XTR_ROWS, (r0, m8, e8) => [
      ...set(rb, add(get(r), shl(get(r0), int(3)))),
      ...set(xb, add(get(X), shl(get(r0), int(3)))),
      ...set(j, int(0)),
      ...whileDo(leU(add(get(j), int(4)), get(p)), columns(4, m8, e8)),
      ...whileDo(ltU(get(j), get(p)), columns(1, m8, e8)),
    ]),
  );
}

/** xtwx(X, n8, p, w, a, b, work, acc): upper triangle of acc (row-major p×p) += X[a..b, ·]'W X[a..b, ·]. */
function xtwxFunc(): Code {
  const f = new Func(8);
  const [X, n8, p, w, a, b, work, acc] = [0, 1, 2, 3, 4, 5, 6, 7];
  const R8 = ROW_BLOCK * 8;
  const [o, j, k, xb, xj, aj, a0, a1, xk, x1, x2, x3, c] = f.locals(I32, 13);
  const s0 = f.locals(V128, 4),
    s1 = f.locals(V128, 4);
  const [u, v, bt] = f.locals(V128, 3);
  const xs = [xk, x1, x2, x3];
  const at = (base: number) => add(get(base), get(o));
  // Two rows (j, j + 1) of the tile against `cols` columns from k: u·x and v·x into s0[q], s1[q].
  const tile = (cols: number, rows: number, m8: number, e8: number): Code => [
    ...set(x1, add(get(xk), get(n8))),
    ...set(x2, add(get(x1), get(n8))),
    ...set(x3, add(get(x2), get(n8))),
    ...[...s0, ...s1].flatMap((l) => set(l, vzero)),
    ...pairs(o, m8, e8, (load) => [
      ...set(u, load(at(a0))),
      ...(rows > 1 ? set(v, load(at(a1))) : []),
      ...[...Array(cols).keys()].flatMap((q) => [
        ...set(bt, load(at(xs[q]))),
        ...set(s0[q], vadd(get(s0[q]), vmul(get(u), get(bt)))),
        ...(rows > 1 ? set(s1[q], vadd(get(s1[q]), vmul(get(v), get(bt)))) : []),
      ]),
    ]),
    ...set(c, add(get(acc), shl(add(mul(get(j), get(p)), get(k)), int(3)))),
    ...[...Array(cols).keys()].flatMap((q) => [
      ...fstore(get(c), fadd(fload(get(c), 8 * q), hsum(get(s0[q]))), 8 * q),
      ...(rows > 1
        ? fstore(
            add(get(c), shl(get(p), int(3))),
            fadd(fload(add(get(c), shl(get(p), int(3))), 8 * q), hsum(get(s1[q]))),
            8 * q,
          )
        : []),
    ]),
    ...set(xk, add(get(xk), mul(get(n8), int(cols)))),
    ...set(k, add(get(k), int(cols))),
  ];
  return f.encode(
    blocks(f, a, b, ROW_BLOCK, (r0, m8, e8) => [
      ...set(xb, add(get(X), shl(get(r0), int(3)))),
      // work[j·R + i] = w[i]·X[i, j] over the block (the odd last row by the f64 ops).
      ...set(xj, get(xb)),
      ...set(aj, get(work)),
      ...forUp(j, int(0), get(p), int(1), [
        ...forUp(
          o,
          int(0),
          get(e8),
          int(16),
          vstore(at(aj), vmul(vload(add(add(get(w), shl(get(r0), int(3))), get(o))), vload(at(xj)))),
        ),
        ...when(ltU(get(e8), get(m8)), [
          ...set(o, get(e8)),
          ...fstore(at(aj), fmul(fload(add(add(get(w), shl(get(r0), int(3))), get(o))), fload(at(xj)))),
        ]),
        ...set(xj, add(get(xj), get(n8))),
        ...set(aj, add(get(aj), int(R8))),
      ]),
      ...set(j, int(0)),
      ...whileDo(leU(add(get(j), int(2)), get(p)), [
        ...set(a0, add(get(work), mul(get(j), int(R8)))),
        ...set(a1, add(get(a0), int(R8))),
        ...set(k, and(get(j), int(-4))),
        ...set(xk, add(get(xb), mul(get(k), get(n8)))),
        ...whileDo(leU(add(get(k), int(4)), get(p)), tile(4, 2, m8, e8)),
        ...whileDo(ltU(get(k), get(p)), tile(1, 2, m8, e8)),
        ...set(j, add(get(j), int(2))),
      ]),
      // p odd: the last diagonal element.
      ...when(ltU(get(j), get(p)), [
        ...set(a0, add(get(work), mul(get(j), int(R8)))),
        ...set(k, get(j)),
        ...set(xk, add(get(xb), mul(get(k), get(n8)))),
        ...tile(1, 1, m8, e8),
      ]),
    ]),
  );
}

/**
 * rowmaths(eta, y, r, w, e16, out): kernels.ts unitRows over the whole pairs of a block's rows (e16 bytes of them,
 * from byte 0 of eta, y, r and w), two rows per instruction, even rows in lane 0: e^−|η| by expNonPositive's
 * operations in its order, μ, residuals into r, weights μ(1 − μ) into w unless w is 0, and at out the lanes' linear
 * loss terms (out, out + 8) and products of 1 + e^−|η| (out + 16, out + 24), begun from 0 and 1 here. Every
 * operation is one IEEE f64 operation of the TypeScript's, in the same order, so the bits are the same.
 */
function rowMathsFunc(): Code {
  const f = new Func(6);
  const [eta, y, r, w, e16, out] = [0, 1, 2, 3, 4, 5];
  const [o] = f.locals(I32, 1);
  const [t, x, k, q, a, e, d, ad, ge, mu, mc, yv, loss, prod, r2, r4, r8] = f.locals(V128, 17);
  const T = (i: number) => vconst(EXP_TAYLOR[i]);
  const lin = (i: number) => vadd(T(i), vmul(T(i + 1), get(q)));
  const pair = (at: Code): Code => [
    ...set(t, vload(add(get(eta), at))),
    ...set(x, vneg(vabs(get(t)))),
    ...set(k, vfloor(vadd(vmul(get(x), vconst(LOG2E)), vconst(0.5)))),
    // q holds r = (x − k·ln2_hi) − k·ln2_lo
    ...set(q, vsub(vsub(get(x), vmul(get(k), vconst(LN2_HI))), vmul(get(k), vconst(LN2_LO)))),
    ...set(r2, vmul(get(q), get(q))),
    ...set(r4, vmul(get(r2), get(r2))),
    ...set(r8, vmul(get(r4), get(r4))),
    // e^r (Estrin's scheme; the terms after 1 summed first), times 2^k: k + 2⁵² + 1023 holds k + 1023 in its low
    // mantissa bits, shifted into the exponent field
    ...set(
      q,
      vadd(
        vconst(1),
        vadd(
          vadd(vadd(get(q), vmul(lin(2), get(r2))), vmul(vadd(lin(4), vmul(lin(6), get(r2))), get(r4))),
          vmul(vadd(vadd(lin(8), vmul(lin(10), get(r2))), vmul(lin(12), get(r4))), get(r8)),
        ),
      ),
    ),
    ...set(a, pick(vlt(get(x), vconst(EXP_MIN)), vzero, vmul(get(q), shl64(vadd(get(k), vconst(2 ** 52 + 1023)), 52)))),
    ...set(e, vadd(vconst(1), get(a))),
    ...set(d, vdiv(vconst(1), get(e))),
    ...set(ad, vmul(get(a), get(d))),
    ...set(ge, vge(get(t), vzero)),
    ...set(mu, pick(get(ge), get(d), get(ad))),
    ...set(mc, pick(get(ge), get(ad), get(d))),
    ...when(get(w), vstore(add(get(w), at), vmul(get(mu), get(mc)))),
    ...set(yv, vload(add(get(y), at))),
    ...vstore(add(get(r), at), pick(veq(get(yv), vconst(1)), get(mc), vsub(get(yv), get(mu)))),
    ...set(prod, vmul(get(prod), get(e))),
    ...set(
      loss,
      vadd(get(loss), pick(vgt(get(t), vzero), vmul(vsub(vconst(1), get(yv)), get(t)), vmul(vneg(get(yv)), get(t)))),
    ),
  ];
  // two pairs of rows an iteration (independent work for the pipeline: 6.6 → 5.5 ns a row), then an odd pair
  const [e32] = f.locals(I32, 1);
  const loop = [
    ...set(e32, and(get(e16), int(-32))),
    ...forUp(o, int(0), get(e32), int(32), [...pair(get(o)), ...pair(add(get(o), int(16)))]),
    ...when(ltU(get(e32), get(e16)), pair(get(e32))),
  ];
  return f.encode([
    ...set(loss, vzero),
    ...set(prod, vconst(1)),
    ...loop,
    ...vstore(get(out), get(loss)),
    ...vstore(add(get(out), int(16)), get(prod)),
  ]);
}

/**
 * The module: memory imported as env.memory; exports xbeta, xtr, xtwx (all parameters i32). `shared`: the import is
 * a shared memory (limits 1 … 65 536 pages), as a row pool's threads instantiate it on one memory; a module can only
 * import the kind of memory it declares.
 */
export function wasmRowKernelBytes(shared = false): Uint8Array<ArrayBuffer> {
  const fns = [xbetaFunc(), xtrFunc(), xtwxFunc(), rowMathsFunc()];
  const sig = (k: number): Code => [0x60, ...vec(new Array<Code>(k).fill([I32])), 0];
  return Uint8Array.from([
    ...[0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00],
    ...section(1, vec([sig(7), sig(8), sig(6)])),
    ...section(
      2,
      vec([[...name('env'), ...name('memory'), 0x02, ...(shared ? [0x03, 1, ...uleb128(65536)] : [0x00, 1])]]),
    ),
    ...section(3, vec([[0], [0], [1], [2]])),
    ...section(7, vec(['xbeta', 'xtr', 'xtwx', 'rowmaths'].map((s, i) => [...name(s), 0x00, i]))),
    ...section(10, vec(fns)),
  ]);
}

const compiled: (WebAssembly.Module | null)[] = [null, null];
/** The compiled module (compiled once per thread and kind of memory). */
export const wasmRowModule = (shared = false): WebAssembly.Module =>
  (compiled[+shared] ??= new WebAssembly.Module(wasmRowKernelBytes(shared)));
const moduleOnce = (): WebAssembly.Module => wasmRowModule(false);

/** Whether this JavaScript engine compiles the module (WebAssembly with SIMD). */
export function wasmSimdSupported(): boolean {
  try {
    return typeof WebAssembly === 'object' && WebAssembly.validate(wasmRowKernelBytes());
  } catch {
    return false;
  }
}

/**
 * The three passes on one design held in the module's memory. `X`, `eta`, `r` and `w` are views into that memory
 * (length n·p and n); a vector passed in that is not the module's own is copied in for rows [a, b) first.
 */
export interface WasmRowKernels {
  readonly n: number;
  readonly p: number;
  readonly X: Float64Array;
  readonly eta: Float64Array;
  readonly r: Float64Array;
  readonly w: Float64Array;
  /** eta[a..b) = X[a..b, ·]β; returns the module's eta. */
  xbeta(beta: ArrayLike<number>, a?: number, b?: number): Float64Array;
  /** out = X[a..b, ·]'r[a..b) (length p). */
  xtr(r: Float64Array, out: Float64Array, a?: number, b?: number): Float64Array;
  /** out = X[a..b, ·]'W X[a..b, ·], row-major p×p, both triangles (as accumulateXtWX). */
  xtwx(w: Float64Array, out: Float64Array, a?: number, b?: number): Float64Array;
}

/** Largest memory of a 32-bit WebAssembly module: 65 536 pages of 64 KiB. */
const MAX_BYTES = 65536 * 65536;

/** Copies the column-major n×p X into a new WebAssembly.Memory (once) and instantiates the kernels on it. */
export function createWasmRowKernels(Xsrc: Float64Array, n: number, p: number): WasmRowKernels {
  if (!Number.isInteger(n) || !Number.isInteger(p) || n < 1 || p < 1 || Xsrc.length < n * p)
    throw new FulcraError('bad-argument', `The design must hold n·p values (n = ${n}, p = ${p}).`);
  const lengths = [n * p, n, n, n, p, p, p * p, ROW_BLOCK * p];
  const offsets: number[] = [];
  let bytes = 0;
  for (const len of lengths) {
    offsets.push(bytes);
    bytes += Math.ceil(len / 2) * 16;
  }
  if (bytes > MAX_BYTES)
    throw new FulcraError('wasm-too-big', `A ${n}×${p} design needs ${bytes} bytes, over WebAssembly's 4 GiB.`);
  const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) });
  const ex = new WebAssembly.Instance(moduleOnce(), { env: { memory } }).exports as Record<
    'xbeta' | 'xtr' | 'xtwx',
    (...args: number[]) => void
  >;
  const [X, eta, r, w, beta, g, acc] = lengths.map((len, i) => new Float64Array(memory.buffer, offsets[i], len));
  X.set(Xsrc.subarray(0, n * p));
  const n8 = n * 8;
  const [oX, oEta, oR, oW, oBeta, oG, oAcc, oWork] = offsets;
  const range = (a: number, b: number) => {
    if (!(Number.isInteger(a) && Number.isInteger(b) && 0 <= a && a <= b && b <= n))
      throw new FulcraError('bad-argument', `Rows [${a}, ${b}) are not within [0, ${n}).`);
  };
  const take = (own: Float64Array, v: Float64Array, a: number, b: number) => {
    if (v !== own) own.set(v.subarray(a, b), a);
  };
  return {
    n,
    p,
    X,
    eta,
    r,
    w,
    xbeta(bv, a = 0, b = n) {
      range(a, b);
      for (let j = 0; j < p; j++) beta[j] = bv[j];
      eta.fill(0, a, b);
      ex.xbeta(oX, n8, p, oBeta, oEta, a, b);
      return eta;
    },
    xtr(rv, out, a = 0, b = n) {
      range(a, b);
      take(r, rv, a, b);
      g.fill(0);
      ex.xtr(oX, n8, p, oR, a, b, oG);
      out.set(g);
      return out;
    },
    xtwx(wv, out, a = 0, b = n) {
      range(a, b);
      take(w, wv, a, b);
      acc.fill(0);
      ex.xtwx(oX, n8, p, oW, a, b, oWork, oAcc);
      for (let j = 0; j < p; j++) for (let k = j; k < p; k++) out[j * p + k] = out[k * p + j] = acc[j * p + k];
      return out;
    },
  };
}
