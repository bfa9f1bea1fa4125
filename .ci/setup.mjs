// One-step set-up used by `npm start` and `npm test`: plain Node, no dependencies.
//   node .ci/setup.mjs deps            install npm packages when missing or stale
//   node .ci/setup.mjs deps browser    also Debian's chromium, poppler-utils, fonts-liberation
import { existsSync, statSync } from 'node:fs';
import { execSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const wants = new Set(process.argv.slice(2));

function run(cmd) {
  console.log(`[setup] ${cmd}`);
  execSync(cmd, { cwd: root, stdio: 'inherit' });
}

function depsStale() {
  const marker = join(root, 'node_modules', '.package-lock.json');
  if (!existsSync(marker)) return true;
  const lock = join(root, 'package-lock.json');
  const pkg = join(root, 'package.json');
  const newest = Math.max(statSync(pkg).mtimeMs, existsSync(lock) ? statSync(lock).mtimeMs : 0);
  return statSync(marker).mtimeMs < newest - 1000;
}

if (wants.has('deps') && depsStale()) {
  const hasLock = existsSync(join(root, 'package-lock.json'));
  run(hasLock ? 'npm ci --no-audit --no-fund' : 'npm install --no-audit --no-fund');
}

if (wants.has('browser')) {
  const chromium = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
  const missing = [];
  if (!existsSync(chromium)) missing.push('chromium');
  if (!existsSync('/usr/bin/pdftotext')) missing.push('poppler-utils');
  if (!existsSync('/usr/share/fonts/truetype/liberation')) missing.push('fonts-liberation');
  if (missing.length > 0) {
    const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
    const hasApt = existsSync('/usr/bin/apt-get');
    if (isRoot && hasApt) {
      run('apt-get update');
      run(`DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends ${missing.join(' ')}`);
    } else {
      console.error(
        `[setup] Missing system packages: ${missing.join(', ')}.\n` +
          `        Install them with: sudo apt-get install -y --no-install-recommends ${missing.join(' ')}\n` +
          '        or set CHROMIUM_PATH to a Chromium binary, then run `npm test` again.',
      );
      process.exit(1);
    }
  }
}
