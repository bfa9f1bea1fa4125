// `npm run fit` / `npm run bench`: runs the command line from plain JavaScript built by esbuild into .cli-build/
// (git-ignored), rebuilt here whenever a source file is newer than the build. Usage: node .ci/cli.mjs fit|bench ...
// The build is one esbuild call (a fraction of a second); an up-to-date start only stats the sources.
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
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
process.argv.splice(2, process.argv.length - 2, ...rest);
process.argv[1] = join(out, `${command}.js`);
await import(pathToFileURL(join(out, `${command}.js`)).href);
