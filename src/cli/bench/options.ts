import { FulcraError } from '../../engine/core';

export interface BenchOptions {
  sizes: { n: number; p: number }[];
  quick: boolean;
  json: boolean;
  /** Timed repeats per fit (the median counts); default 3. */
  repeats?: number;
  references: boolean;
  extras: boolean;
  browser: boolean;
  out: string;
  seed: number;
  help: boolean;
}

export const benchUsage = `Usage: npm run bench -- [options]

Times Fulcra's logistic fit (the worker's engine, in Node) against scikit-learn and R's glm.fit on seeded
synthetic data, plus CSV import, threshold queries, bootstrap, loss surface, peak memory and (with --browser)
import + fit in the page. Data and results go to bench-out/.

  --sizes 1e4x10,1e5x50   fit sizes as rows x predictors (default 1e4,1e5,1e6 x 10,50)
  --quick                 small sizes only (1e4x10,1e4x50,1e5x10) and small side measurements (about a minute)
  --repeats R             timed repeats per fit, each in the same process; the median counts (default 3)
  --no-reference          skip scikit-learn and R
  --no-extras             skip import / threshold / bootstrap / loss surface
  --browser               also run the browser measurement (Playwright + /usr/bin/chromium)
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
