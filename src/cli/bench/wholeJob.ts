import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { Measurement } from './extras';

/**
 * The whole job as a user runs it, each a fresh process timed from outside, start to finish: `npm run fit` (the
 * built command line, `node .ci/cli.mjs fit`) on the synthetic CSV — reading it, the fit, profile-likelihood
 * limits and term tests where the size rule keeps them, the apparent evaluation and the printed JSON record —
 * and, when Rscript is installed, R reading the same CSV and running glm + confint (profile) + drop1 (LR tests)
 * (reference/glm_whole.R), and, when Debian's /usr/bin/python3 has pandas with scikit-learn or statsmodels, what
 * an analyst would run there: read_csv plus LogisticRegression (estimates only), or plus statsmodels Logit and its
 * summary (Wald intervals, no profile limits or term tests) (reference/pandas_whole.py). Wall seconds; the child's
 * CPU seconds come from the operating system's accounting. Fulcra and the Python jobs take a few seconds each and
 * run `repeats` times in turn (the median counts); R's runs for minutes at 10⁵ × 50 and once.
 */
export function wholeJob(
  csv: string,
  n: number,
  p: number,
  withR: boolean,
  withPython = true,
  repeats = 3,
): Measurement[] {
  const out: Measurement[] = [];
  // An up-to-date build first, so the timed run measures the command, not its one-off build.
  spawnSync('node', ['.ci/cli.mjs', 'fit', '--help'], { stdio: 'ignore' });
  const python = withPython && existsSync(PY);
  const modes = [
    ['sklearn', 'pandas + scikit-learn', 'read_csv, LogisticRegression newton-cholesky: estimates only'],
    ['statsmodels', 'pandas + statsmodels Logit', 'read_csv, Logit Newton + summary: Wald intervals only'],
  ] as const;
  const pyModes = python ? modes.filter(([mode]) => pythonHas(mode)) : [];
  // The fast whole jobs run `repeats` times in turn (Fulcra, then each Python one, round after round), so that a
  // slower minute of the machine falls on all of them alike; the median run counts.
  const fulcraRuns: Timed[] = [];
  const pyRuns = new Map<string, Timed[]>(pyModes.map(([mode]) => [mode, []]));
  for (let k = 0; k < Math.max(1, repeats); k++) {
    fulcraRuns.push(timed('node', ['.ci/cli.mjs', 'fit', csv, '--outcome', 'y', '--json']));
    for (const [mode] of pyModes)
      pyRuns
        .get(mode)!
        .push(timed(PY, [join(process.cwd(), 'src', 'cli', 'bench', 'reference', 'pandas_whole.py'), mode, csv]));
  }
  const fulcra = medianRun(fulcraRuns);
  if ('error' in fulcra) out.push(failed(`npm run fit, whole process, at ${n} × ${p}`, fulcra.error));
  else {
    const r = JSON.parse(fulcra.stdout) as { warnings: { code: string }[] };
    const skipped = r.warnings.map((w) => w.code).filter((c) => c.startsWith('large-data-'));
    out.push({
      name: `npm run fit, whole process, at ${n} × ${p}`,
      value: fulcra.wall,
      unit: 's',
      cpuSeconds: fulcra.cpu,
      detail:
        `read ${csv.split('/').pop()}, fit, ` +
        (skipped.length ? `skipped by the size rule: ${skipped.join(', ')}; ` : 'profile limits and term tests, ') +
        `apparent evaluation, the JSON record printed; ${runsText(fulcraRuns)}`,
    });
  }
  if (withR) {
    const r = timed('Rscript', [join(process.cwd(), 'src', 'cli', 'bench', 'reference', 'glm_whole.R'), csv]);
    if ('error' in r) out.push(failed(`R glm + confint + drop1, whole process, at ${n} × ${p}`, r.error));
    else
      out.push({
        name: `R glm + confint + drop1, whole process, at ${n} × ${p}`,
        value: r.wall,
        unit: 's',
        cpuSeconds: r.cpu,
        detail: `read.csv, glm, profile intervals (MASS), LR test per term: ${r.stdout.trim()}; one run`,
      });
  }
  if (python)
    for (const [mode, label, what] of modes) {
      const name = `${label}, whole process, at ${n} × ${p}`;
      const runs = pyRuns.get(mode);
      if (!runs) {
        out.push({ name, value: NaN, unit: 's', detail: `not run: ${PY} has no pandas or ${mode}` });
        continue;
      }
      const r = medianRun(runs);
      if ('error' in r) out.push(failed(name, r.error));
      else
        out.push({
          name,
          value: r.wall,
          unit: 's',
          cpuSeconds: r.cpu,
          detail: `${what} (${r.stdout.trim()}); ${runsText(runs)}`,
        });
    }
  return out;
}

type Timed = { wall: number; cpu: number; stdout: string } | { error: string };

/** The run of median wall time (the first failure when any run failed). */
export function medianRun(runs: Timed[]): Timed {
  const failure = runs.find((r) => 'error' in r);
  if (failure) return failure;
  const ok = [...(runs as { wall: number; cpu: number; stdout: string }[])].sort((a, b) => a.wall - b.wall);
  return ok[(ok.length - 1) >> 1];
}

/** "median of 3 runs: 2.71, 2.80, 2.93 s" (or "one run"). */
function runsText(runs: Timed[]): string {
  const walls = runs.flatMap((r) => ('wall' in r ? [r.wall] : [])).sort((a, b) => a - b);
  return walls.length < 2
    ? 'one run'
    : `median of ${walls.length} runs: ${walls.map((w) => w.toFixed(2)).join(', ')} s`;
}

const PY = '/usr/bin/python3';

/** Whether Debian's Python can import pandas and the library `mode` names. */
function pythonHas(mode: 'sklearn' | 'statsmodels'): boolean {
  return spawnSync(PY, ['-c', `import pandas, ${mode}`], { stdio: 'ignore' }).status === 0;
}

function failed(name: string, error: string): Measurement {
  return { name, value: NaN, unit: 's', detail: `failed: ${error}` };
}

/**
 * Runs a command, under /usr/bin/time when installed (Debian's `time`: user and system seconds of the child; CPU
 * is NaN without it), stdout kept.
 */
function timed(cmd: string, args: string[]): Timed {
  const time = existsSync('/usr/bin/time');
  const t0 = process.hrtime.bigint();
  const r = spawnSync(time ? '/usr/bin/time' : cmd, time ? ['-f', 'FULCRA-TIME %U %S', cmd, ...args] : args, {
    encoding: 'utf8',
    maxBuffer: 256 << 20,
  });
  const wall = Number(process.hrtime.bigint() - t0) / 1e9;
  if (r.error) return { error: r.error.message };
  if (r.status !== 0) return { error: `exit ${r.status}: ${(r.stderr ?? '').trim().split('\n').slice(-3).join(' ')}` };
  const m = /FULCRA-TIME ([\d.]+) ([\d.]+)/.exec(r.stderr ?? '');
  return { wall, cpu: m ? Number(m[1]) + Number(m[2]) : NaN, stdout: r.stdout };
}
