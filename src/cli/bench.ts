/**
 * `npm run bench`: performance benchmark of the engine against scikit-learn and R on seeded synthetic data,
 * plus import, threshold, bootstrap, loss-surface, memory and (optionally) in-browser measurements.
 * Not part of `npm test`. See benchUsage for options.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { join } from 'node:path';
import { FulcraError } from '../engine/core';
import { bootstrap, csvImport, surface, thresholdQueries, type Measurement } from './bench/extras';
import { benchUsage, parseBenchArgs } from './bench/options';
import { diagnosticsCost } from './bench/diagnostics';
import { monitoringCost } from './bench/monitoring';
import { wasmTrial } from './bench/wasmTrial';
import { wholeJob } from './bench/wholeJob';
import { fulcraFit, glmFit, maxRelGap, referenceThreads, sklearnFit, type FitTiming } from './bench/run';
import { ensureSynth } from './bench/synth';
import { judgeTargets, ONE_THREAD, renderReport, type BenchRecord, type SizeResult } from './bench/report';
import { defaultThreads, startNodeRowPool } from './nodeRowPool';
import { installRowPool } from '../engine/numerics';

async function main(): Promise<void> {
  const o = parseBenchArgs(process.argv.slice(2));
  if (o.help) {
    process.stdout.write(benchUsage);
    return;
  }
  mkdirSync(o.out, { recursive: true });
  const log = (s: string) => {
    if (!o.json) process.stderr.write(s + '\n');
  };
  const record: BenchRecord = {
    date: new Date().toISOString(),
    node: process.version,
    cpu: cpus()[0]?.model ?? 'unknown',
    cores: cpus().length,
    loadAverageAtStart: loadavg()[0],
    quick: o.quick,
    seed: o.seed,
    referenceThreads: referenceThreads(),
    timing:
      'Wall-clock seconds of the fit only: every program loads the data (float64 files with the same values as ' +
      'the CSV) before its timer starts. CPU seconds (user + system of the process, all threads) are shown beside.',
    sizes: [],
    extras: [],
    browser: null,
    targets: [],
  };
  for (const { n, p } of o.sizes) {
    log(`· data ${n}×${p}`);
    const f = ensureSynth(o.out, n, p, o.seed);
    const repeats = o.repeats ?? 3;
    const size: SizeResult = {
      n,
      p,
      csv: f.csv,
      csvBytes: f.csvBytes,
      eventRate: f.eventRate,
      designBytes: n * (p + 1) * 8,
      fits: [],
      errors: [],
    };
    // The judged run uses every core, as the page does (navigator.hardwareConcurrency); one thread is shown beside it.
    const cores = defaultThreads();
    log(`  Fulcra engine (${cores} thread${cores === 1 ? '' : 's'})`);
    const eng = fulcraFit(f, cores, repeats, true);
    if ('error' in eng) {
      size.errors.push(`Fulcra engine: ${eng.error}`);
      record.sizes.push(size);
      continue;
    }
    const tight = eng.tight!;
    size.tight = tight;
    size.fits.push(eng.timing);
    if (cores > 1) {
      log('  Fulcra engine (1 thread)');
      const one = fulcraFit(f, 1, repeats, false);
      if ('error' in one) size.errors.push(`${ONE_THREAD}: ${one.error}`);
      else size.fits.push(one.timing);
    }
    if (o.references) {
      for (const s of ['newton-cholesky', 'lbfgs'] as const) {
        log(`  scikit-learn ${s}`);
        const r = sklearnFit(f, s, repeats);
        if ('error' in r) size.errors.push(`scikit-learn ${s}: ${r.error}`);
        else size.fits.push(r);
      }
      log('  R glm.fit');
      const r = glmFit(f, repeats);
      if ('error' in r) size.errors.push(`R glm.fit: ${r.error}`);
      else size.fits.push(r);
    }
    for (const t of size.fits as FitTiming[]) {
      t.gap = maxRelGap(t.beta, tight);
      // Every run is listed: the first one in a fresh process is the cold one (compilation, first touch of memory).
      if (t.seconds.length > 1) t.notes.unshift(`runs ${t.seconds.map((x) => x.toFixed(3)).join(' / ')} s`);
    }
    record.sizes.push(size);
  }
  if (o.extras) {
    // As in the page: a row pool for fits above one chunk of rows (the loss surface's fit at 10⁵ rows).
    const np = await startNodeRowPool(defaultThreads());
    installRowPool(np.pool);
    const m: Measurement[] = record.extras;
    const q = o.quick;
    log('· CSV import');
    m.push(await csvImport(o.out, q ? 1e5 : 1e6, 20, o.seed));
    log('· threshold queries');
    m.push(...thresholdQueries(q ? 1e5 : 1e6, 10000, o.seed));
    log('· bootstrap');
    m.push(await bootstrap(o.out, 1e4, 20, q ? 20 : 200, o.seed));
    log('· loss surface');
    m.push(surface(o.out, q ? 1e4 : 1e5, 10, 64, o.seed));
    log('· monitoring');
    m.push(monitoringCost(q ? 1e5 : 1e6, o.seed));
    log('· the whole job: npm run fit and R, each a fresh process');
    const small = ensureSynth(o.out, 1e4, 20, o.seed);
    m.push(...wholeJob(small.csv, 1e4, 20, o.references, o.references, o.repeats));
    // R at 10⁵ × 50 takes about 9 minutes: only with --slow.
    if (!q)
      m.push(
        ...wholeJob(ensureSynth(o.out, 1e5, 50, o.seed).csv, 1e5, 50, o.slow && o.references, o.references, o.repeats),
      );
    log('· per-row diagnostics');
    m.push(diagnosticsCost(o.out, 1e5, 50, o.seed));
    if (!q) m.push(diagnosticsCost(o.out, 1e6, 50, o.seed));
    log('· WebAssembly SIMD kernels (trial, one thread)');
    m.push(...wasmTrial(q ? 1e5 : 1e6, 50, o.seed));
    installRowPool(null);
    await np.close();
  }
  if (o.browser) {
    log('· browser');
    const { browserBench } = await import('./bench/browser');
    record.browser = await browserBench({ out: o.out, n: o.quick ? 1e5 : 1e6, p: 20, seed: o.seed, log });
    log('· the single file: size, first paint and the full record from file://');
    const { singleFileBench } = await import('./bench/singleFile');
    const job = o.quick ? null : { n: 1e5, p: 50, seed: o.seed };
    record.extras.push(...(await singleFileBench({ out: o.out, log, job })));
  }
  record.targets = judgeTargets(record);
  record.loadAverageAtEnd = loadavg()[0];
  const file = join(o.out, `bench-${record.date.replace(/[:.]/g, '-')}.json`);
  writeFileSync(file, JSON.stringify(record, null, 1));
  if (o.json) process.stdout.write(JSON.stringify(record) + '\n');
  else process.stdout.write(renderReport(record) + `\nFull record: ${file}\n`);
}

main().catch((e: unknown) => {
  if (e instanceof FulcraError) {
    process.stderr.write(`${e.message}${e.suggestion ? `\n${e.suggestion}` : ''}\n`);
    process.exit(2);
  }
  throw e;
});
