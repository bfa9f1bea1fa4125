// `npm run fit` / `npm run bench`: runs the command line from plain JavaScript built by esbuild into .cli-build/
// (git-ignored), rebuilt here whenever a source file is newer than the build. Usage: node .ci/cli.mjs fit|bench ...
// The build is one esbuild call (a fraction of a second); an up-to-date start only stats the sources.
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { constants } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
// .cli-build/cli/ keeps the sources' depth below the root, so `new URL('../../package.json', import.meta.url)` in
// src/cli/fit.ts finds the same file from the build.
const out = join(root, '.cli-build', 'cli');
const entries = { fit: 'src/cli/fit.ts', bench: 'src/cli/bench.ts', rowHelperNode: 'src/cli/rowHelperNode.ts' };

/** Newest modification time (ms) of the files under dir whose names end in one of exts. */
function newest(dir, exts) {
  let t = 0;
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) t = Math.max(t, newest(p, exts));
    else if (exts.some((x) => e.name.endsWith(x))) t = Math.max(t, statSync(p).mtimeMs);
  }
  return t;
}

/** Builds when a built entry is missing or older than any source (src/, package.json, the lock file, this file). */
async function ensureBuilt() {
  const built = Object.keys(entries).map((k) => join(out, `${k}.js`));
  const oldest = built.every((f) => existsSync(f)) ? Math.min(...built.map((f) => statSync(f).mtimeMs)) : -1;
  const sources = Math.max(
    newest(join(root, 'src'), ['.ts', '.mjs', '.json']),
    ...['package.json', 'package-lock.json', '.ci/cli.mjs'].map((f) =>
      existsSync(join(root, f)) ? statSync(join(root, f)).mtimeMs : 0,
    ),
  );
  if (oldest >= sources) return;
  const { build } = await import('esbuild');
  // runtime dependencies are bundled (fewer files to load at start); tools the bench drives (vite, playwright) are not
  const dev = Object.keys(JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).devDependencies ?? {});
  await build({
    entryPoints: entries,
    outdir: out,
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    external: dev.flatMap((d) => [d, `${d}/*`]),
    sourcemap: 'linked',
    logLevel: 'warning',
    // bundled CommonJS packages may require Node's own modules, which an ES module can do only through this
    banner: { js: "import { createRequire as __cr } from 'node:module'; const require = __cr(import.meta.url);" },
  });
}

const [command, ...rest] = process.argv.slice(2);
if (!(command in entries) || command === 'rowHelperNode') {
  process.stderr.write('usage: node .ci/cli.mjs fit|bench [arguments]\n');
  process.exit(2);
}
await ensureBuilt();

/**
 * Large data on Linux: `fit` runs in a child whose C library backs its large buffers with transparent huge pages
 * (GLIBC_TUNABLES=glibc.malloc.hugetlb=1; other C libraries ignore it). Every megabyte of fresh memory costs a page
 * fault per 4 KiB otherwise, about 2.6 ms a megabyte on the development machine: the whole record of a 37 MB CSV
 * (10⁵ × 50) took a median 2.97 s and 80 000 faults without, 2.77 s and 57 000 faults with, and the extra start
 * costs about 0.1 s, so only a file of at least 16 MB is run so. FULCRA_NO_HUGE_PAGES=1 turns it off.
 */
function hugePagesChild() {
  if (command !== 'fit' || process.platform !== 'linux' || process.env.GLIBC_TUNABLES !== undefined) return false;
  if (process.env.FULCRA_NO_HUGE_PAGES) return false;
  try {
    if (!/\[(always|madvise)\]/.test(readFileSync('/sys/kernel/mm/transparent_hugepage/enabled', 'utf8'))) return false;
  } catch {
    return false;
  }
  // 16 MB: PARALLEL_MIN_BYTES (src/io/parallelParse.ts), where a file is also read in parts
  return rest.some((a) => {
    try {
      const st = statSync(a);
      return st.isFile() && st.size >= 16 * 2 ** 20;
    } catch {
      return false;
    }
  });
}
if (hugePagesChild()) {
  const r = spawnSync(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), command, ...rest], {
    stdio: 'inherit',
    env: { ...process.env, GLIBC_TUNABLES: 'glibc.malloc.hugetlb=1' },
  });
  process.exit(r.status ?? (r.signal ? 128 + (constants.signals[r.signal] ?? 0) : 1));
}

process.argv.splice(2, process.argv.length - 2, ...rest);
process.argv[1] = join(out, `${command}.js`);
await import(pathToFileURL(join(out, `${command}.js`)).href);
