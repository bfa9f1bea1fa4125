import { FulcraError } from '../../engine/core';

export interface BenchOptions {
  sizes: { n: number; p: number }[];
  quick: boolean;
  json: boolean;
  /** Timed repeats per fit and per fast whole-process run (the median counts); default 3. */
  repeats?: number;
  references: boolean;
  extras: boolean;
  browser: boolean;
  /** Also the measurements that take many minutes (R's whole job at 10⁵ × 50, about 9 minutes). */
  slow: boolean;
  out: string;
  seed: number;
  help: boolean;
}

export const benchUsage = `Usage: npm run bench -- [options]

Times Fulcra's logistic fit (the worker's engine, in Node) against scikit-learn and R's glm.fit on seeded
synthetic data, plus CSV import, threshold queries, bootstrap, loss surface, peak memory and (with --browser)
import + fit in the page and the single file's size and first paint. Data and results go to bench-out/.

  --sizes 1e4x10,1e5x50   fit sizes as rows x predictors (default 1e4,1e5,1e6 x 10,50)
  --quick                 small sizes only (1e4x10,1e4x50,1e5x10) and small side measurements (about a minute)
  --repeats R             timed repeats per fit, each in the same process, and of the fast whole-process runs
                          (npm run fit and the pandas ones, in turn); the median counts (default 3)
  --no-reference          skip scikit-learn and R
  --no-extras             skip import / threshold / bootstrap / loss surface
  --browser               also run the browser measurements (Playwright + /usr/bin/chromium): import + fit in the
                          page, and the single file (npm run build:single) built afresh: its size, gzip size,
                          first contentful paint and first heading from file:// (median of 3 fresh pages)
  --slow                  also time R glm + confint + drop1 as a whole process at 1e5x50 (about 9 minutes;
                          without it R's whole job runs at 1e4x20 only); no effect with --quick, --no-extras
                          or --no-reference
  --out DIR               output folder (default bench-out)
  --seed S                data seed (default 20261202)
  --json                  print the full result record as JSON
  --help                  this text
`;

/** "1e5x50" → {n: 100000, p: 50}. */
export function parseSize(s: string): { n: number; p: number } {
  const m = /^\s*([0-9.eE+]+)\s*[x×]\s*([0-9]+)\s*$/.exec(s);
  const n = m ? Number(m[1]) : NaN,
    p = m ? Number(m[2]) : NaN;
  if (!m || !Number.isInteger(n) || n < 10 || !Number.isInteger(p) || p < 1) {
    throw new FulcraError('bad-argument', `Size "${s}" is not of the form ROWSxPREDICTORS (e.g. 1e5x50).`);
  }
  return { n, p };
}

export function parseBenchArgs(argv: string[]): BenchOptions {
  const o: BenchOptions = {
    sizes: [],
    quick: false,
    json: false,
    references: true,
    extras: true,
    browser: false,
    slow: false,
    out: 'bench-out',
    seed: 20261202,
    help: false,
  };
  let sizes: string | undefined;
  for (let k = 0; k < argv.length; k++) {
    const a = argv[k];
    const value = (): string => {
      const v = argv[++k];
      if (v === undefined) throw new FulcraError('bad-argument', `${a} needs a value.`);
      return v;
    };
    if (a === '--sizes') sizes = value();
    else if (a === '--quick') o.quick = true;
    else if (a === '--json') o.json = true;
    else if (a === '--no-reference') o.references = false;
    else if (a === '--no-extras') o.extras = false;
    else if (a === '--browser') o.browser = true;
    else if (a === '--slow') o.slow = true;
    else if (a === '--out') o.out = value();
    else if (a === '--help' || a === '-h') o.help = true;
    else if (a === '--repeats' || a === '--seed') {
      const v = Number(value());
      if (!Number.isInteger(v) || v < (a === '--repeats' ? 1 : 0))
        throw new FulcraError('bad-argument', `${a} must be a whole number, got ${argv[k]}.`);
      if (a === '--repeats') o.repeats = v;
      else o.seed = v;
    } else throw new FulcraError('bad-argument', `Unknown option "${a}".`, 'Run npm run bench -- --help.');
  }
  const list = sizes ?? (o.quick ? '1e4x10,1e4x50,1e5x10' : '1e4x10,1e4x50,1e5x10,1e5x50,1e6x10,1e6x50');
  o.sizes = list
    .split(',')
    .filter((s) => s.trim())
    .map(parseSize);
  return o;
}
