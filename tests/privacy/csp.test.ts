import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import type { ConfigEnv, UserConfig } from 'vite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import viteConfig from '../../vite.config';

/**
 * The Content-Security-Policy that vite.config.ts writes into both builds, read from fresh builds in temporary
 * folders (the served build, and `--mode single`, the one-file build for file://).
 */
const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const dirs: string[] = [];

async function build(mode: 'production' | 'single'): Promise<string> {
  const out = mkdtempSync(join(tmpdir(), `fulcra-csp-${mode}-`));
  dirs.push(out);
  // NODE_ENV=production: the test runner sets NODE_ENV=test, which would make a development build of React.
  await promisify(execFile)(
    'npx',
    ['vite', 'build', '--mode', mode, '--outDir', out, '--emptyOutDir', '--logLevel', 'error'],
    { cwd: ROOT, maxBuffer: 16 << 20, env: { ...process.env, NODE_ENV: 'production' } },
  );
  return out;
}

const walk = (dir: string): string[] =>
  readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? walk(join(dir, e.name)) : [join(dir, e.name)],
  );

/** The policies in <meta http-equiv="Content-Security-Policy">, with the HTML entities of the content decoded. */
function metaPolicies(html: string): { policy: string; index: number }[] {
  return [...html.matchAll(/<meta\s+http-equiv="Content-Security-Policy"\s+content="([^"]*)"/gi)].map((m) => ({
    policy: m[1]
      .replace(/&#39;/g, "'")
      .replace(/&quot;/g, '"')
      .replace(/&amp;/g, '&'),
    index: m.index!,
  }));
}

function directives(policy: string): Map<string, string[]> {
  return new Map(
    policy
      .split(';')
      .map((d) => d.trim().split(/\s+/))
      .filter((d) => d[0])
      .map(([k, ...v]) => [k, v]),
  );
}

/** Attributes that make the browser load something, outside the inline <script>/<style> text. */
const loadedUrls = (html: string) =>
  [
    ...html.replace(/<(script|style)\b[^>]*>[\s\S]*?<\/\1>/gi, '').matchAll(/\b(?:src|href)\s*=\s*["']?([^"'\s>]+)/gi),
  ].map((m) => m[1]);

function expectNoNetworkAndNoEval(d: Map<string, string[]>) {
  expect(d.get('default-src')).toEqual(["'none'"]);
  expect(d.get('connect-src')).toEqual(["'none'"]);
  expect(d.get('object-src')).toEqual(["'none'"]);
  expect(d.get('base-uri')).toEqual(["'none'"]);
  expect(d.get('form-action')).toEqual(["'none'"]);
  for (const [name, sources] of d) {
    expect(sources, name).not.toContain("'unsafe-eval'");
    expect(
      sources.filter((s) => /^(https?:|wss?:|\*|\/\/)/.test(s) || s.includes('*')),
      name,
    ).toEqual([]);
  }
  expect(d.get('script-src')).not.toContain("'unsafe-inline'");
}

let normal = '';
let single = '';
beforeAll(async () => {
  [normal, single] = await Promise.all([build('production'), build('single')]);
}, 600_000);
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('served build (npm run build)', () => {
  it('has one policy, before any script or stylesheet: no connection, no eval, scripts only from its own files', () => {
    const html = readFileSync(join(normal, 'index.html'), 'utf8');
    const metas = metaPolicies(html);
    expect(metas).toHaveLength(1);
    expect(metas[0].index).toBeLessThan(html.search(/<script|<link rel="stylesheet"/));
    const d = directives(metas[0].policy);
    expectNoNetworkAndNoEval(d);
    // 'wasm-unsafe-eval': the engine compiles its own WebAssembly kernels (wasmSimd.ts bytes); no eval of text
    expect(d.get('script-src')).toEqual(["'self'", "'wasm-unsafe-eval'"]);
    expect(d.get('worker-src')).toEqual(["'self'", 'blob:']);
    expect(d.get('img-src')).toEqual(["'self'", 'data:', 'blob:']);
    expect(d.get('font-src')).toEqual(["'self'", 'data:']);
    expect(loadedUrls(html).filter((u) => !u.startsWith('./') && !u.startsWith('data:'))).toEqual([]);
  });

  it('ships the engine once, as a module worker file, without the inline copy meant for the single file', () => {
    const js = walk(normal).filter((f) => f.endsWith('.js'));
    const entry = js.find((f) => /[\\/]index-[\w-]+\.js$/.test(f));
    expect(entry).toBeDefined();
    const code = readFileSync(entry!, 'utf8');
    expect(code).toMatch(/fulcra\.worker-[\w-]+\.js/);
    expect(code).not.toContain('revokeObjectURL(self.location.href)');
    expect(code).not.toContain('exists only in the single-file build');
    expect(js.filter((f) => /fulcra\.worker-[\w-]+\.js$/.test(f))).toHaveLength(1);
  });
});

describe('both builds', () => {
  it("leave out jsPDF's optional HTML/SVG-image modules (html2canvas, DOMPurify, canvg), never called", () => {
    const files = [...walk(normal), ...walk(single)];
    expect(files.filter((f) => /[\\/](html2canvas|purify\.es|index\.es)-[\w-]+\.js$/.test(f))).toEqual([]);
    const all = files
      .filter((f) => /\.(js|html)$/.test(f))
      .map((f) => readFileSync(f, 'utf8'))
      .join('\n');
    // Text found only in each library (html2canvas 1.4.1, dompurify 3.5.0, canvg 3.0.11 in node_modules), checked
    // present in a build made without the stubs.
    expect(all).not.toContain('html2canvas-container');
    expect(all).not.toContain('SAFE_FOR_TEMPLATES');
    expect(all).not.toContain('animateColor');
  });
});

describe('single-file build (npm run build:single)', () => {
  it('is one HTML file and loads nothing except data: URLs', () => {
    expect(walk(single).map((f) => f.slice(single.length + 1))).toEqual(['fulcra.html']);
    const html = readFileSync(join(single, 'fulcra.html'), 'utf8');
    expect(loadedUrls(html).filter((u) => !u.startsWith('data:'))).toEqual([]);
    expect(html).not.toMatch(/<link\b[^>]*rel="(?:stylesheet|modulepreload)"/);
  });

  it('allows exactly its own inline scripts by sha256, a blob: worker, and no connection', () => {
    const html = readFileSync(join(single, 'fulcra.html'), 'utf8');
    const metas = metaPolicies(html);
    expect(metas).toHaveLength(1);
    expect(metas[0].index).toBeLessThan(html.indexOf('<script'));
    const d = directives(metas[0].policy);
    expectNoNetworkAndNoEval(d);
    const scripts = [...html.matchAll(/<script\b[^>]*>([\s\S]*?)<\/script>/gi)].map((m) => m[1]);
    expect(scripts.length).toBeGreaterThanOrEqual(1);
    const hashes = scripts.map((s) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`);
    expect([...d.get('script-src')!].sort()).toEqual([...hashes, "'wasm-unsafe-eval'"].sort());
    expect(d.get('worker-src')).toEqual(['blob:']);
    expect(d.get('img-src')).toEqual(['data:', 'blob:']);
    expect(d.get('font-src')).toEqual(['data:']);
    expect(metas[0].policy).not.toContain("'self'");
  });

  it('keeps every inline script intact: no </script or <!-- in the code that could end or escape the element', () => {
    const html = readFileSync(join(single, 'fulcra.html'), 'utf8');
    expect((html.match(/<script\b/gi) ?? []).length).toBe((html.match(/<\/script>/gi) ?? []).length);
    for (const m of html.matchAll(/<script\b[^>]*>([\s\S]*?)<\/script>/gi)) {
      expect(m[1]).not.toMatch(/<!--|<script/i);
      expect(m[1]).not.toContain('\r');
    }
  });

  it('starts the engine as a classic worker from a blob: URL, which Chromium allows on a file:// page', () => {
    const html = readFileSync(join(single, 'fulcra.html'), 'utf8');
    // Vite's inline-worker wrapper revokes the blob URL through self.location.href only in a classic worker
    // (a module worker uses import.meta.url); see vite 8.3.8 dist/node/chunks/node.js, webWorkerPlugin.
    expect(html).toContain('(self.URL || self.webkitURL).revokeObjectURL(self.location.href);');
    expect(html).not.toContain('URL.revokeObjectURL(import.meta.url);');
  });
});

describe('servers (vite.config.ts)', () => {
  const config = (env: ConfigEnv) => (viteConfig as unknown as (e: ConfigEnv) => UserConfig)(env);
  const header = (h: unknown) => String((h as Record<string, string> | undefined)?.['Content-Security-Policy'] ?? '');

  it('the dev server sends a policy that connects only to itself (page and HMR websocket) and allows no eval', () => {
    const d = directives(header(config({ command: 'serve', mode: 'development' }).server?.headers));
    expect(d.get('default-src')).toEqual(["'none'"]);
    expect(d.get('connect-src')).toEqual(["'self'"]);
    // The dev server's React-refresh preamble is an inline script; the built app needs no inline permission.
    expect(d.get('script-src')).toEqual(["'self'", "'unsafe-inline'", "'wasm-unsafe-eval'"]);
    for (const [name, sources] of d) expect(sources, name).not.toContain("'unsafe-eval'");
  });

  it('the preview server sends the built policy as a header, which also reaches the worker script', async () => {
    const sent = header(config({ command: 'serve', mode: 'production', isPreview: true }).preview?.headers);
    const html = readFileSync(join(normal, 'index.html'), 'utf8');
    expect(sent).toBe(metaPolicies(html)[0].policy);
  });
});
