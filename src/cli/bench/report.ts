import type { Measurement } from './extras';
import type { FitTiming } from './run';

export interface SizeResult {
  n: number;
  p: number;
  csv: string;
  csvBytes: number;
  eventRate: number;
  /** Bytes of the float64 design including the intercept column. */
  designBytes: number;
  /** Tightly converged coefficients: further full Newton steps from Fulcra's estimate until no decrease. */
  tight?: number[];
  fits: FitTiming[];
  errors: string[];
}

export interface BrowserResult {
  n: number;
  p: number;
  importSeconds: number | null;
  fitSeconds: number | null;
  /** Longest main-thread task (PerformanceObserver 'longtask', ≥ 50 ms by definition); 0 when none. */
  longestTaskMs: number | null;
  longTasks: number;
  how: string;
  /** What the fit's record holds beyond the Wald table, e.g. "profile limits and term tests". */
  inference?: string;
  error?: string;
}

export interface Target {
  name: string;
  goal: string;
  measured: string;
  met: boolean | null;
}

export interface BenchRecord {
  date: string;
  node: string;
  cpu: string;
  cores: number;
  loadAverageAtStart: number;
  loadAverageAtEnd?: number;
  quick: boolean;
  seed: number;
  referenceThreads: Record<string, string>;
  timing: string;
  sizes: SizeResult[];
  extras: Measurement[];
  browser: BrowserResult | null;
  targets: Target[];
}

/** The engine timed on one thread: shown beside the judged run (all cores, as the page runs it), not judged. */
export const ONE_THREAD = 'Fulcra engine, 1 thread';

/** Below this relative coefficient gap to the tight reference a timing counts. */
export const PRECISION = 1e-8;

const find = (r: BenchRecord, n: number, p: number, who: string): FitTiming | undefined =>
  r.sizes.find((s) => s.n === n && s.p === p)?.fits.find((f) => f.who === who);

function ratioTarget(r: BenchRecord, n: number, p: number, fulcra: string, ref: string, limit: number): Target {
  const a = find(r, n, p, fulcra),
    b = find(r, n, p, ref);
  const name = `${fulcra} ${n.toExponential(0)}×${p} / ${ref}`;
  const goal = `≤ ${limit} (both within ${PRECISION} of the tight optimum)`;
  if (!a || !b) return { name, goal, measured: 'not run', met: null };
  const ratio = a.median / b.median;
  const precise = (a.gap ?? Infinity) <= PRECISION && (b.gap ?? Infinity) <= PRECISION;
  const cpu =
    a.cpuSeconds.length && b.cpuSeconds.length
      ? ` (CPU-time ratio ${(median(a.cpuSeconds) / median(b.cpuSeconds)).toFixed(2)})`
      : '';
  return {
    name,
    goal,
    measured: `${ratio.toFixed(2)}${cpu}${precise ? '' : '; precision not reached'}`,
    met: ratio <= limit && precise,
  };
}

/** What limits a missed target, as measured while building it (DEVELOPERS.md, "Speed"). */
const LIMITS: [RegExp, string][] = [
  [
    /sklearn newton-cholesky/,
    "X'WX and the per-iteration passes over X run at about 1.3·10⁹ multiply-adds per second per thread in plain " +
      'TypeScript, where BLAS uses SIMD; a second thread adds about 1.5×, not 2×, on this machine ' +
      "(a pass over a 10⁵×51 X: 10.8 → 7.4 ms; X'WX: 85 → 55 ms); with the WebAssembly SIMD kernels (f64x2) the " +
      'products and the row maths run two rows an instruction, without fused multiply-adds (the TypeScript must ' +
      'give the same bits), and at 10⁵ rows the fixed costs of a fit (checks, standardising, the aliasing test) weigh.',
  ],
  [
    /^CSV import/,
    'per-cell work in the column builder and the per-column summaries (distinct count, median) after the parse; ' +
      "the machine's other load also counts here (wall time).",
  ],
  [/^bootstrap/, 'each replicate is a full weighted refit plus two calibration fits and two AUC sorts on one thread.'],
  [
    /^loss surface/,
    'n × 64² softplus evaluations on one thread; above ~1.2·10⁵ rows the grid uses an evenly spaced row subsample ' +
      '(stated in the record).',
  ],
  [/main-thread task/, 'rendering of a large table or plot on the main thread.'],
  [
    /^the page at 10⁶/,
    'the CSV takes ~1.5–2 s to read on 2 threads (150 MB; its type inference and column summaries on one); the fit ' +
      'with profile limits and term tests (~170 passes over 10⁶ × 21, ~13 ms each on one thread with the ' +
      'WebAssembly SIMD kernels, row maths included), the evaluation (~1.2 s: spline calibration curve, calibration ' +
      'fits, sorts of 10⁶ numbers) and the per-row diagnostics (~0.8 s) take ~4.5 s.',
  ],
  [
    /^npm run fit, full record, against pandas \+ statsmodels/,
    'statsmodels gives the estimates and Wald intervals only; the full record adds profile limits for 51 ' +
      'coefficients and 50 likelihood-ratio tests (~450 passes over 10⁵ × 51, ~0.8 s on 2 threads), the apparent ' +
      'evaluation and per-row diagnostics (~0.5 s), and reads the CSV into typed, summarised columns (~0.5 s).',
  ],
  [
    /^npm run fit, full record, against R glm/,
    'R glm + confint + drop1 took 193–198 s here on 2026-12-05 (534 s where the target was set), so the ratio ' +
      'asks for ~2.3–2.4 s; the full record takes 2.3–2.5 s run alone, ~2.8 s inside the bench (see the ' +
      'statsmodels row).',
  ],
  [/peak memory/, 'working copies of the design made by the solver.'],
];

function limitOf(name: string): string | undefined {
  return LIMITS.find(([re]) => re.test(name))?.[1];
}

const median = (v: number[]): number => {
  const s = [...v].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

export function judgeTargets(r: BenchRecord): Target[] {
  const t: Target[] = [];
  const whos = [
    ...new Set(
      r.sizes.flatMap((s) => s.fits.map((f) => f.who)).filter((w) => w.startsWith('Fulcra') && w !== ONE_THREAD),
    ),
  ];
  for (const who of whos) {
    t.push(ratioTarget(r, 1e6, 50, who, 'sklearn newton-cholesky', 1.0));
    t.push(ratioTarget(r, 1e6, 50, who, 'R glm.fit', 0.25));
    t.push(ratioTarget(r, 1e5, 50, who, 'sklearn newton-cholesky', 1.0));
  }
  const extra = (prefix: string, goal: string, ok: (v: number) => boolean, fmt: (v: number) => string) => {
    const m = r.extras.find((e) => e.name.startsWith(prefix));
    const judged = m && !r.quick;
    t.push({
      name: m?.name ?? prefix,
      goal,
      measured: m ? fmt(m.value) + (r.quick ? ' (quick size: not judged)' : '') : 'not run',
      met: judged ? ok(m.value) : null,
    });
  };
  extra(
    'CSV import',
    '≥ 50 MB/s at 10⁶×20',
    (v) => v >= 50,
    (v) => `${v.toFixed(1)} MB/s`,
  );
  extra(
    'threshold query',
    '≤ 1 ms at 10⁶',
    (v) => v <= 1,
    (v) => `${v.toFixed(4)} ms`,
  );
  extra(
    'bootstrap',
    '≤ 15 s for B = 200 at 10⁴×20',
    (v) => v <= 15,
    (v) => `${v.toFixed(2)} s`,
  );
  extra(
    'loss surface',
    '≤ 1 s for 64×64 at 10⁵',
    (v) => v <= 1,
    (v) => `${v.toFixed(2)} s`,
  );
  extra(
    'monitoring',
    '≤ 1 s at 10⁶ rows (scored and charted)',
    (v) => v <= 1,
    (v) => `${v.toFixed(2)} s`,
  );
  // The whole job at 10⁵ × 50: the full record (profile limits and term tests included) within 6 s, ≤ 1.5 × pandas +
  // statsmodels Logit (Wald only) and, when R's whole job ran there (--slow), ≤ 0.012 × R glm + confint + drop1.
  const whole = r.extras.find((e) => e.name === 'npm run fit, whole process, at 100000 × 50');
  const full = whole && !/skipped by the size rule/.test(whole.detail ?? '');
  const ref = (label: string) =>
    r.extras.find((e) => e.name === `${label}, whole process, at 100000 × 50` && Number.isFinite(e.value));
  const wholeTarget = (goal: string, ok: (v: number) => boolean, measured: (v: number) => string) =>
    t.push({
      name: 'npm run fit, full record, whole process, at 10⁵ × 50',
      goal,
      measured: whole
        ? `${measured(whole.value)}${full ? '' : ' (profile limits or term tests skipped)'}`
        : 'not run (--quick or --no-extras)',
      met: whole && Number.isFinite(whole.value) ? full === true && ok(whole.value) : null,
    });
  wholeTarget(
    '≤ 6 s',
    (v) => v <= 6,
    (v) => `${v.toFixed(2)} s`,
  );
  for (const [label, factor] of [
    ['pandas + statsmodels Logit', 1.5],
    ['R glm + confint + drop1', 0.012],
  ] as const) {
    const m = ref(label);
    if (!m) {
      t.push({
        name: `npm run fit, full record, against ${label} at 10⁵ × 50`,
        goal: `≤ ${factor} ×`,
        measured: label.startsWith('R') ? 'not run (--slow)' : 'not run',
        met: null,
      });
      continue;
    }
    t.push({
      name: `npm run fit, full record, against ${label} at 10⁵ × 50`,
      goal: `≤ ${factor} ×`,
      measured: whole
        ? `${(whole.value / m.value).toFixed(3)} × (${whole.value.toFixed(2)} s against ${m.value.toFixed(2)} s)`
        : 'not run',
      met: whole && full ? whole.value / m.value <= factor : null,
    });
  }
  const b = r.browser;
  t.push({
    name: 'longest main-thread task (browser import + fit)',
    goal: '≤ 50 ms',
    measured: b
      ? b.longestTaskMs === null
        ? `not measured${b.error ? ': ' + b.error : ''}`
        : `${b.longestTaskMs.toFixed(0)} ms (${b.longTasks} long tasks)`
      : 'not run (--browser)',
    met: b && b.longestTaskMs !== null && !r.quick ? b.longestTaskMs <= 50 : null,
  });
  t.push({
    name: `the page at 10⁶ × 20: open the CSV, fit and evaluate`,
    goal: '≤ 3 s',
    measured:
      b && b.importSeconds !== null && b.fitSeconds !== null
        ? `${(b.importSeconds + b.fitSeconds).toFixed(2)} s (import ${b.importSeconds.toFixed(2)} s, fit with ` +
          `${b.inference ?? 'the inference the size rule allows'}, evaluation and diagnostics ` +
          `${b.fitSeconds.toFixed(2)} s)`
        : 'not run (--browser)',
    met:
      b && b.importSeconds !== null && b.fitSeconds !== null && b.n >= 1e6 ? b.importSeconds + b.fitSeconds <= 3 : null,
  });
  const big = [...r.sizes].sort((x, y) => y.n * y.p - x.n * x.p)[0];
  for (const who of whos) {
    const f = big?.fits.find((x) => x.who === who);
    t.push({
      name: `peak memory, ${who} fit at ${big ? `${big.n}×${big.p}` : '-'}`,
      goal: '≤ 1.5 × float64 design (data + fit, above the runtime)',
      measured:
        f?.maxRssBytes && f.addedRssBytes !== undefined
          ? `${(f.addedRssBytes / big.designBytes).toFixed(2)} × ` +
            `(peak RSS ${(f.maxRssBytes / 2 ** 20).toFixed(0)} MiB incl. runtime = ` +
            `${(f.maxRssBytes / big.designBytes).toFixed(2)} ×; design ${(big.designBytes / 2 ** 20).toFixed(0)} MiB)`
          : 'not run',
      met: f?.addedRssBytes !== undefined && big.n >= 1e6 ? f.addedRssBytes <= 1.5 * big.designBytes : null,
    });
  }
  return t;
}

const pad = (s: string, w: number) => (s.length >= w ? s : s + ' '.repeat(w - s.length));
const lpad = (s: string, w: number) => (s.length >= w ? s : ' '.repeat(w - s.length) + s);

export function renderReport(r: BenchRecord): string {
  const out: string[] = [];
  out.push(
    `Fulcra benchmark ${r.date}  Node ${r.node}  ${r.cpu} × ${r.cores}  ` +
      `load average ${r.loadAverageAtStart.toFixed(1)} → ${r.loadAverageAtEnd?.toFixed(1)}`,
  );
  out.push(
    `Reference threads: ${Object.entries(r.referenceThreads)
      .map(([k, v]) => `${k}=${v}`)
      .join(' ')}. ${r.timing}`,
  );
  out.push('');
  out.push(
    pad('size', 10) +
      pad('program', 26) +
      lpad('median s', 10) +
      lpad('CPU s', 9) +
      lpad('iter', 6) +
      lpad('engine/it', 11) +
      lpad('max rel gap', 13) +
      '  notes',
  );
  for (const s of r.sizes) {
    const eng = s.fits.find((f) => f.who === 'Fulcra engine');
    for (const f of s.fits) {
      const ratio = (a?: FitTiming) => (a && a !== f ? (a.median / f.median).toFixed(2) : '');
      out.push(
        pad(`${s.n.toExponential(0)}×${s.p}`, 10) +
          pad(f.who, 26) +
          lpad(f.median.toFixed(3), 10) +
          lpad(median(f.cpuSeconds).toFixed(3), 9) +
          lpad(String(f.iterations ?? ''), 6) +
          lpad(ratio(eng), 11) +
          lpad(f.gap === null ? '' : f.gap.toExponential(1), 13) +
          `  ${f.notes.join('; ')}`,
      );
    }
    for (const e of s.errors) out.push(`${pad(`${s.n.toExponential(0)}×${s.p}`, 10)}ERROR ${e}`);
  }
  out.push(
    'Fulcra engine = the engine on all cores ' +
      '(a pool of worker threads over fixed chunks of rows, as the page runs it); ' +
      "engine/it = its median ÷ this program's median; " +
      'gap = max_j |β_j − β*_j|/|β*_j| to the tight optimum β* (speed counts at ≤ 1e-8).',
  );
  if (r.extras.length) {
    out.push('');
    for (const m of r.extras)
      out.push(
        `${pad(m.name, 34)}${lpad(m.value.toPrecision(4), 10)} ${pad(m.unit, 5)} ` +
          `${m.cpuSeconds === undefined ? '' : `[CPU ${m.cpuSeconds.toFixed(2)} s] `}${m.detail}`,
      );
  }
  if (r.browser) {
    const b = r.browser;
    out.push('');
    out.push(
      `browser ${b.n}×${b.p}: import ${b.importSeconds?.toFixed(2) ?? '-'} s, ` +
        `fit ${b.fitSeconds?.toFixed(2) ?? '-'} s, ` +
        `longest main-thread task ${b.longestTaskMs?.toFixed(0) ?? '-'} ms (${b.longTasks} long tasks); ` +
        `${b.how}${b.error ? '; ERROR ' + b.error : ''}`,
    );
  }
  out.push('');
  out.push('Targets');
  for (const t of r.targets) {
    out.push(
      `  ${pad(t.met === null ? 'not judged' : t.met ? 'met' : 'MISSED', 11)}` +
        `${pad(t.name, 62)} ${pad(t.goal, 44)} ${t.measured}`,
    );
    const why = t.met === false ? limitOf(t.name) : undefined;
    if (why) out.push(`  ${' '.repeat(11)}what limits it: ${why}`);
  }
  return out.join('\n');
}
