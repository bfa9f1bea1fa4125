import { describe, expect, it } from 'vitest';
import { parseBenchArgs, parseSize } from '../../src/cli/bench/options';
import { judgeTargets, ONE_THREAD, type BenchRecord } from '../../src/cli/bench/report';
import { synthesise, trueCoefficients } from '../../src/cli/bench/synth';
import { medianRun } from '../../src/cli/bench/wholeJob';

describe('benchmark options', () => {
  it('reads sizes like 1e5x50 and rejects malformed ones', () => {
    expect(parseSize('1e5x50')).toEqual({ n: 100000, p: 50 });
    expect(parseBenchArgs(['--sizes', '1e4x10,2e4x3', '--json']).sizes).toEqual([
      { n: 10000, p: 10 },
      { n: 20000, p: 3 },
    ]);
    expect(parseBenchArgs(['--quick']).sizes.every((s) => s.n <= 1e5)).toBe(true);
    expect(() => parseSize('1e5')).toThrow(/ROWSxPREDICTORS/);
    expect(() => parseBenchArgs(['--bogus'])).toThrow(/Unknown option/);
  });
});

describe('whole-process runs', () => {
  it('count the run of median wall time, and a failed run fails the measurement', () => {
    const run = (wall: number) => ({ wall, cpu: wall * 1.2, stdout: `run ${wall}` });
    expect(medianRun([run(3.1), run(2.7), run(2.9)])).toEqual(run(2.9));
    expect(medianRun([run(2.8)])).toEqual(run(2.8));
    // an even count takes the lower middle run (a real run, not an average of two)
    expect(medianRun([run(4), run(1), run(3), run(2)])).toEqual(run(2));
    expect(medianRun([run(2.7), { error: 'exit 1: no such file' }, run(2.9)])).toEqual({
      error: 'exit 1: no such file',
    });
  });
});

describe('synthetic data', () => {
  it('has Σβ_j² = 2 over the slopes and is reproducible from its seed', () => {
    const b = trueCoefficients(50);
    let ss = 0;
    for (let j = 1; j <= 50; j++) ss += b[j] ** 2;
    expect(ss).toBeCloseTo(2, 12);
    const a = synthesise(500, 3, 7),
      c = synthesise(500, 3, 7);
    expect(Array.from(a.X)).toEqual(Array.from(c.X));
    expect(Array.from(a.y)).toEqual(Array.from(c.y));
    for (const v of a.X) expect(Math.round(v * 1e4) / 1e4).toBe(v);
  });
});

/** A bench record with nothing measured, but `over`. */
const record = (over: Partial<BenchRecord>): BenchRecord => ({
  date: '',
  node: '',
  cpu: '',
  cores: 2,
  loadAverageAtStart: 0,
  quick: false,
  seed: 1,
  referenceThreads: {},
  timing: '',
  extras: [],
  browser: null,
  targets: [],
  sizes: [],
  ...over,
});

describe('targets', () => {
  it('judges a fit ratio only when both fits reached 1e-8 precision', () => {
    const fit = (who: string, median: number, gap: number) => ({
      who,
      library: '',
      seconds: [median],
      cpuSeconds: [median],
      median,
      iterations: 1,
      beta: [],
      gap,
      notes: [],
    });
    const rec = record({
      sizes: [
        {
          n: 1e6,
          p: 50,
          csv: '',
          csvBytes: 0,
          eventRate: 0.3,
          designBytes: 8,
          errors: [],
          fits: [fit('Fulcra engine', 2, 1e-12), fit('sklearn newton-cholesky', 4, 1e-12), fit('R glm.fit', 4, 1e-6)],
        },
      ],
    });
    const t = judgeTargets(rec);
    expect(t.find((x) => x.name === 'Fulcra engine 1e+6×50 / sklearn newton-cholesky')?.met).toBe(true);
    const glm = t.find((x) => x.name === 'Fulcra engine 1e+6×50 / R glm.fit');
    expect(glm?.met).toBe(false);
    expect(glm?.measured).toMatch(/precision not reached/);
  });

  it('judges the engine as the page runs it (all cores), and shows the one-thread run without judging it', () => {
    const fit = (who: string, median: number) => ({
      who,
      library: '',
      seconds: [median],
      cpuSeconds: [median],
      median,
      iterations: 1,
      beta: [],
      gap: 0,
      notes: [],
    });
    const rec = record({
      sizes: [
        {
          n: 1e5,
          p: 50,
          csv: '',
          csvBytes: 0,
          eventRate: 0.3,
          designBytes: 8,
          errors: [],
          fits: [fit('Fulcra engine', 2), fit(ONE_THREAD, 3), fit('sklearn newton-cholesky', 2.5)],
        },
      ],
    });
    const t = judgeTargets(rec);
    expect(t.find((x) => x.name === 'Fulcra engine 1e+5×50 / sklearn newton-cholesky')?.met).toBe(true);
    expect(t.some((x) => x.name.startsWith(ONE_THREAD))).toBe(false);
  });

  it('judges the page at 10⁶ × 20 on import plus fit against 3 s, and leaves it unjudged without --browser', () => {
    const page = (importSeconds: number, fitSeconds: number): BenchRecord['browser'] => ({
      n: 1e6,
      p: 20,
      importSeconds,
      fitSeconds,
      longestTaskMs: 0,
      longTasks: 0,
      how: '',
    });
    const judged = (browser: BenchRecord['browser']) =>
      judgeTargets(record({ browser })).find((x) => x.name.startsWith('the page at 10⁶'));
    expect(judged(page(2, 7.3))?.met).toBe(false);
    expect(judged(page(1, 1.5))?.met).toBe(true);
    expect(judged(page(1, 1.5))?.measured).toMatch(/^2\.50 s \(import 1\.00 s/);
    expect(judged(null)?.met).toBeNull();
  });
});
