import { loadavg } from 'node:os';
import {
  accumulateXtWX,
  blockedXtr,
  CHUNK_ROWS,
  createRng,
  linearPredictor,
  logisticRows,
  ROW_BLOCK,
} from '../../engine/numerics';
// eslint-disable-next-line fulcra/layers -- a trial kept off the engine's surface until it is wired in (issue 17)
import { createWasmRowKernels, type WasmRowKernels } from '../../engine/numerics/wasmSimd';
import type { Measurement } from './extras';

/** X'WX must be at least this much faster, and agree to 1e-12, for the trial to be kept (issue 17, item 5). */
const BAR = 1.5;
const AGREE = 1e-12;

const ms = (f: () => void): number => {
  const t0 = process.hrtime.bigint();
  f();
  return Number(process.hrtime.bigint() - t0) / 1e6;
};

/** max |a − b| / max |b| (a kernel's sums can cancel to ~0 in single entries, so not entry by entry). */
function relGap(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let scale = 0,
    gap = 0;
  for (let i = 0; i < b.length; i++) {
    scale = Math.max(scale, Math.abs(b[i]));
    gap = Math.max(gap, Math.abs(a[i] - b[i]));
  }
  return scale > 0 ? gap / scale : gap;
}

const median = (v: number[]): number => [...v].sort((a, b) => a - b)[v.length >> 1];

interface Pair {
  ts: number[];
  wasm: number[];
  load: number[];
}

/** Three runs of each, TypeScript and WASM taking turns so that the machine's drift falls on both alike. */
function race(ts: () => void, wasm: () => void): Pair {
  const r: Pair = { ts: [], wasm: [], load: [] };
  for (let k = 0; k < 3; k++) {
    r.ts.push(ms(ts));
    r.wasm.push(ms(wasm));
    r.load.push(loadavg()[0]);
  }
  return r;
}

/**
 * The WebAssembly SIMD trial of issue 17 (src/engine/numerics/wasmSimd.ts) on seeded n×p data: X'WX, X'r and Xβ
 * on one thread, TypeScript (kernels.ts, loss.ts) against WASM with X copied into the module's memory once (that
 * copy timed apart), median of 3 in ms, the largest relative difference, and the verdict: "kept" only when X'WX is
 * at least 1.5× faster and every result agrees to 1e-12. X'WX runs by the row pool's chunks of rows, partial sums
 * added in chunk order, as a fit does.
 */
export function wasmTrial(n: number, p: number, seed: number): Measurement[] {
  const rng = createRng(seed);
  const X = new Float64Array(n * p);
  for (let i = 0; i < X.length; i++) X[i] = rng.normal();
  const w = new Float64Array(n),
    r = new Float64Array(n),
    y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    w[i] = 0.25 * rng.next();
    r[i] = rng.normal();
    y[i] = rng.next() < 0.3 ? 1 : 0;
  }
  const beta = Float64Array.from({ length: p }, () => 0.1 * rng.normal());
  const size = `${n}×${p}`;

  let k: WasmRowKernels | undefined;
  const createMs = ms(() => (k = createWasmRowKernels(X, n, p)));
  const kw = k!;
  const copyMs = ms(() => kw.X.set(X));
  kw.w.set(w);
  kw.r.set(r);

  const H = new Float64Array(p * p),
    Hw = new Float64Array(p * p),
    part = new Float64Array(p * p),
    work = new Float64Array(ROW_BLOCK * p);
  const byChunks = (out: Float64Array, one: (a: number, b: number) => void) => {
    out.fill(0);
    for (let a = 0; a < n; a += CHUNK_ROWS) {
      one(a, Math.min(n, a + CHUNK_ROWS));
      for (let i = 0; i < p * p; i++) out[i] += part[i];
    }
  };
  const tsH = () => byChunks(H, (a, b) => accumulateXtWX(X, n, p, w, part, work, a, b));
  const wasmH = () => byChunks(Hw, (a, b) => kw.xtwx(kw.w, part, a, b));
  const g = new Float64Array(p),
    gw = new Float64Array(p);
  const tsG = () => blockedXtr(X, n, p, r, g);
  const wasmG = () => kw.xtr(kw.r, gw);
  const eta = new Float64Array(n);
  const tsEta = () => linearPredictor(X, n, p, beta, undefined, eta);
  const wasmEta = () => kw.xbeta(beta);

  // Warm-up on a few chunks: V8 runs a WebAssembly function in its baseline compiler until it is hot, and a
  // call already running does not switch to the optimised code.
  const warm = Math.min(n, 8 * CHUNK_ROWS);
  for (let a = 0; a < warm; a += CHUNK_ROWS) {
    const b = Math.min(warm, a + CHUNK_ROWS);
    accumulateXtWX(X, n, p, w, part, work, a, b);
    kw.xtwx(kw.w, part, a, b);
    kw.xtr(kw.r, gw, a, b);
    kw.xbeta(beta, a, b);
  }
  tsG();
  tsEta();

  const rH = race(tsH, wasmH),
    rG = race(tsG, wasmG),
    rE = race(tsEta, wasmEta);
  // The fit's own Xβ is the blocked one inside logisticRows (with the row maths and X'r): its η is the reference.
  const etaFit = new Float64Array(n),
    wFit = new Float64Array(n),
    gFit = new Float64Array(p);
  const fusedMs = ms(() => logisticRows(X, n, p, y, beta, undefined, undefined, etaFit, undefined, wFit, gFit));
  const gaps = { xtwx: relGap(Hw, H), xtr: relGap(gw, g), xbeta: relGap(wasmEta(), etaFit) };
  const maxGap = Math.max(gaps.xtwx, gaps.xtr, gaps.xbeta);

  const runs = (v: number[]) => v.map((t) => t.toPrecision(3)).join(' / ');
  const loads = (pr: Pair) => pr.load.map((l) => l.toFixed(2)).join(' / ');
  const rows = (label: string, pr: Pair, tsWhat: string, extra = ''): Measurement[] => {
    const ratio = median(pr.ts) / median(pr.wasm);
    return [
      {
        name: `${label} ${size} TypeScript`,
        value: median(pr.ts),
        unit: 'ms',
        detail: `${tsWhat}, one thread; runs ${runs(pr.ts)} ms (load ${loads(pr)})${extra}`,
      },
      {
        name: `${label} ${size} WASM SIMD`,
        value: median(pr.wasm),
        unit: 'ms',
        detail: `${ratio.toFixed(2)}× the TypeScript speed; runs ${runs(pr.wasm)} ms; f64x2, X in WASM memory`,
      },
    ];
  };
  const ratioH = median(rH.ts) / median(rH.wasm);
  const kept = ratioH >= BAR && maxGap <= AGREE;
  return [
    ...rows("X'WX", rH, `accumulateXtWX by chunks of ${CHUNK_ROWS} rows`),
    ...rows("X'r", rG, 'blockedXtr'),
    ...rows(
      'Xβ',
      rE,
      'linearPredictor (loss.ts, a column at a time)',
      `; the fit's blocked Xβ is inside logisticRows, whose whole pass (Xβ, row maths, X'r) took ` +
        `${fusedMs.toFixed(0)} ms`,
    ),
    {
      name: `WASM memory and copy ${size}`,
      value: createMs,
      unit: 'ms',
      detail:
        `a new ${((n * p * 8) / 2 ** 20).toFixed(0)} MiB WebAssembly.Memory (pages touched for the first time by ` +
        `the copy), instantiation and the copy of X: paid once per fit if X were kept there; a second copy into ` +
        `the touched memory ${copyMs.toFixed(0)} ms`,
    },
    {
      name: `WASM max relative gap ${size}`,
      value: maxGap,
      unit: '',
      detail:
        `max |WASM − TS| / max |TS|: X'WX ${gaps.xtwx.toExponential(1)}, X'r ${gaps.xtr.toExponential(1)}, ` +
        `Xβ ${gaps.xbeta.toExponential(1)} (against logisticRows' η)`,
    },
    {
      name: `WASM SIMD verdict ${size}`,
      value: ratioH,
      unit: '×',
      detail:
        `${kept ? 'kept' : 'not kept'}: X'WX ${ratioH.toFixed(2)}× faster (bar ${BAR}×), ` +
        `results agree to ${maxGap.toExponential(1)} (bar ${AGREE.toExponential(0)}); wired into the fit's row ` +
        'passes (wasmPasses.ts), where the TypeScript sums take the same order and so the same bits',
    },
  ];
}
