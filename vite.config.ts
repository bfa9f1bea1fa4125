import { createHash } from 'node:crypto';
import { defineConfig } from 'vitest/config';
import type { Plugin } from 'vite';
import react from '@vitejs/plugin-react';
import { asScriptComment, noticeCollector, noticesText } from './buildNotices.js';

type Target = 'served' | 'single' | 'dev';

/**
 * Content-Security-Policy. Built app ('served', 'single'): a <meta> written at build time; nothing may be fetched
 * or sent (connect-src 'none', even to the page's own server, so a copy hosted on an intranet server cannot post
 * data back to it either), no eval, scripts only from the app's own files or, in the single file, by sha256.
 * 'wasm-unsafe-eval' lets the engine compile its WebAssembly kernels (bytes written by src/engine/numerics/
 * wasmSimd.ts, nothing fetched); it allows no eval of JavaScript text.
 * 'dev': sent as a header by the dev server, which needs an inline React-refresh preamble and its HMR websocket.
 * style-src keeps 'unsafe-inline': React's `style` props go through the CSSOM and need no permission, but
 * style="" attributes written as markup and the single file's inlined <style> do; CSS cannot leak anything
 * because img-src and font-src allow no remote address.
 * frame-ancestors is not listed: browsers ignore it in a <meta> policy.
 */

function policy(target: Target, scriptHashes: string[] = []): string {
  const single = target === 'single';
  const self = single ? [] : ["'self'"];
  const directives: [string, string[]][] = [
    ['default-src', ["'none'"]],
    [
      'script-src',
      [
        ...self,
        ...(target === 'dev' ? ["'unsafe-inline'"] : []),
        // compiling WebAssembly (the row passes' SIMD kernels, built from bytes inside the bundle): not eval of text
        "'wasm-unsafe-eval'",
        ...scriptHashes.map((h) => `'sha256-${h}'`),
      ],
    ],
    // blob: also for the unzipper of .xlsx files (fflate), which inflates large parts in a worker made from a blob.
    ['worker-src', [...self, 'blob:']],
    ['connect-src', target === 'dev' ? ["'self'"] : ["'none'"]],
    ['img-src', [...self, 'data:', 'blob:']],
    ['style-src', [...self, "'unsafe-inline'"]],
    ['font-src', [...self, 'data:']],
    ['object-src', ["'none'"]],
    ['base-uri', ["'none'"]],
    ['form-action', ["'none'"]],
  ];
  return directives.map(([k, v]) => `${k} ${v.join(' ')}`).join('; ');
}

/** The policy as a <meta> right after <meta charset> (a <meta> policy covers only what comes after it). */
function withPolicy(html: string, content: string): string {
  const out = html.replace(
    /(<meta charset="[^"]*"\s*\/?>)/i,
    `$1\n    <meta http-equiv="Content-Security-Policy" content="${content}" />`,
  );
  if (out === html)
    throw new Error('Content-Security-Policy: index.html has no <meta charset> to place the policy after');
  return out;
}

/** Normal build: the policy as a <meta> at build time (transformIndexHtml), so the dev server is unaffected. */
function cspMetaPlugin(): Plugin {
  return {
    name: 'fulcra:csp-meta',
    apply: 'build',
    transformIndexHtml: {
      order: 'post',
      handler: (html) => withPolicy(html, policy('served')),
    },
  };
}

/**
 * Normal build: the `?worker&inline` import of src/bridge/engineWorker.ts becomes an unused stub, so the engine is
 * bundled once.
 */
function inlineWorkerStub(): Plugin {
  const stub = '\0fulcra:inline-worker-stub';
  return {
    name: 'fulcra:inline-worker-stub',
    enforce: 'pre',
    resolveId: (id) => (/fulcra\.worker\.ts\?worker&inline$/.test(id) ? stub : undefined),
    load: (id) =>
      id === stub
        ? 'export default function InlineEngineWorker() { ' +
          'throw new Error("The inline engine worker exists only in the single-file build."); }'
        : undefined,
  };
}

/**
 * jsPDF's optional modules (html2canvas, DOMPurify, canvg) serve only its .html() and addSvgAsImage(), which Fulcra
 * never calls (tests/privacy checks that); they become stubs that throw, so neither build ships their code — it
 * would otherwise be folded into the single file's worker.
 */
function jspdfOptionalStubs(): Plugin {
  const prefix = '\0fulcra:unused-jspdf-optional:';
  return {
    name: 'fulcra:unused-jspdf-optional',
    enforce: 'pre',
    // jsPDF's output('pdfobjectnewwindow') (never used by Fulcra) names a CDN script; blank it so no outside
    // address ships in the bundle at all.
    transform: (code, id) =>
      /[\\/]jspdf[\\/]/.test(id) && code.includes('cdnjs.cloudflare.com')
        ? { code: code.replace(/https:\/\/cdnjs\.cloudflare\.com\/ajax\/libs\/pdfobject\/[^"'`]*/g, ''), map: null }
        : undefined,
    resolveId: (id, importer) =>
      /^(html2canvas|dompurify|canvg)$/.test(id) && importer && /[\\/]jspdf[\\/]/.test(importer)
        ? prefix + id
        : undefined,
    load: (id) =>
      id.startsWith(prefix)
        ? `const unused = () => { throw new Error('${id.slice(prefix.length)} is not part of Fulcra ` +
          "(jsPDF HTML/SVG-image features are not used).'); };\n" +
          'export default unused; export const Canvg = { fromString: unused };'
        : undefined,
  };
}

/**
 * Single-file build: the engine's row pool needs a cross-origin-isolated page, which a file:// page never is, so
 * the module that would start helper workers (and make the bundler emit a second worker file) becomes a stub.
 */
function noRowPoolInSingleFile(): Plugin {
  const stub = '\0fulcra:no-row-pool';
  return {
    name: 'fulcra:no-row-pool',
    enforce: 'pre',
    resolveId: (id) => (/[\\/]rowPoolBrowser(\.ts)?$/.test(id) ? stub : undefined),
    load: (id) => (id === stub ? 'export async function startBrowserRowPool() { return 1; }' : undefined),
  };
}

/**
 * Cross-origin isolation (so that the engine worker may share memory with its helper threads): sent by the dev
 * server and `vite preview`; a hosted copy must send the same two headers, or the engine runs on one thread.
 */
const isolation = { 'Cross-Origin-Opener-Policy': 'same-origin', 'Cross-Origin-Embedder-Policy': 'require-corp' };

/**
 * Script text for an inline <script>: `\x3C` keeps `</script`, `<script` and `<!--` from ending or escaping the
 * element (a minified bundle only has them inside string, template or regex literals, where `\x3C` means `<`);
 * CR is normalised as the HTML parser would, so the CSP hash matches the text the browser sees.
 */
const inlineScript = (code: string) => code.replace(/\r\n?/g, '\n').replace(/<(?=\/script|script|!--)/gi, '\\x3C');
/** Stylesheet text for an inline <style>: only `</style` could end it early; `\3c ` is `<` in CSS. */
const inlineStyle = (css: string) => css.replace(/<(?=\/style)/gi, '\\3c ');
const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('base64');

type Notices = ReturnType<typeof noticeCollector>;

/**
 * `vite build --mode single`: inlines the entry script and stylesheet into one HTML file (dist-single/fulcra.html)
 * that works from file://, with the third-party notices as one comment at the end of the entry script, then adds
 * the policy with the sha256 of each inline script (notices included) so script-src needs no 'unsafe-inline'.
 * Fails the build if anything would still be loaded from a separate file.
 */
function singleFilePlugin(notices: Notices): Plugin {
  return {
    name: 'fulcra:single-file',
    apply: 'build',
    enforce: 'post',
    generateBundle: {
      order: 'post',
      handler(_options, bundle) {
        const page = bundle['index.html'];
        if (!page || page.type !== 'asset') this.error('single-file build: index.html is missing from the bundle');
        const take = (ref: string): string => {
          const name = ref.replace(/^\.?\//, '');
          const out = bundle[name];
          if (!out) this.error(`single-file build: ${ref} is referenced by index.html but not in the bundle`);
          delete bundle[name];
          return out.type === 'chunk'
            ? out.code
            : typeof out.source === 'string'
              ? out.source
              : Buffer.from(out.source).toString('utf8');
        };
        const hashes: string[] = [];
        let html = String(page.source)
          .replace(/<script\b[^>]*\bsrc="([^"]+)"[^>]*><\/script>/g, (tag, src: string) => {
            if (!/\btype="module"/.test(tag)) this.error(`single-file build: unexpected classic script ${src}`);
            // The notices once, after the entry script's code (the builds drop every comment from the code itself).
            const code = inlineScript(
              take(src) + (hashes.length ? '' : `\n${asScriptComment(noticesText(notices))}\n`),
            );
            hashes.push(sha256(code));
            return `<script type="module">${code}</script>`;
          })
          .replace(
            /<link\b[^>]*\brel="stylesheet"[^>]*\bhref="([^"]+)"[^>]*>/g,
            (_tag, href: string) => `<style>${inlineStyle(take(href))}</style>`,
          );
        const leftover = /<(?:script|link)\b[^>]*\b(?:src|href)="(?!data:)[^"]*"/i.exec(
          html.replace(/<(script|style)\b[^>]*>[\s\S]*?<\/\1>/g, ''),
        );
        if (leftover) this.error(`single-file build: still loads a separate file: ${leftover[0]}`);
        for (const [name, out] of Object.entries(bundle)) {
          if (name === 'index.html') continue;
          const base = name.split('/').pop()!;
          if (html.includes(base))
            this.error(`single-file build: the inlined code refers to ${name}, which would not be there`);
          delete bundle[name];
          this.info(`single-file build: dropped unused ${out.type} ${name}`);
        }
        html = withPolicy(html, policy('single', hashes));
        delete bundle['index.html'];
        this.emitFile({ type: 'asset', fileName: 'fulcra.html', source: html });
      },
    },
  };
}

/** Normal build: the third-party notices as one text file beside index.html. */
function noticesFilePlugin(notices: Notices): Plugin {
  return {
    name: 'fulcra:notices-file',
    apply: 'build',
    generateBundle: {
      order: 'post',
      handler() {
        this.emitFile({ type: 'asset', fileName: 'third-party-notices.txt', source: noticesText(notices) });
      },
    },
  };
}

/** Modules of the @stdlib distribution packages. */
const STDLIB = /[\\/]node_modules[\\/]@stdlib[\\/]/;

export default defineConfig(({ mode }) => {
  const single = mode === 'single';
  // The packages whose code the page and its workers carry, gathered over the page build and each worker build.
  const notices = noticeCollector();
  return {
    plugins: [
      react(),
      jspdfOptionalStubs(),
      notices.plugin(),
      single ? singleFilePlugin(notices) : inlineWorkerStub(),
      ...(single ? [] : [cspMetaPlugin(), noticesFilePlugin(notices)]),
    ],
    base: './',
    // public/ (robots.txt for a hosted copy) is copied into the served build only: the single file is one file.
    publicDir: single ? false : 'public',
    // The single file starts its worker from a blob: URL, which Chromium allows from file:// only for a classic
    // worker; iife also folds the worker's dynamic imports (jsPDF's optional modules) into the one worker script.
    worker: {
      format: single ? 'iife' : 'es',
      plugins: () => [jspdfOptionalStubs(), notices.plugin(), ...(single ? [noRowPoolInSingleFile()] : [])],
      // No comments in the worker code (Vite's worker build keeps legal and JSDoc comments by default, where the
      // page build drops them): their licence texts are in the notices, once.
      rolldownOptions: { output: { comments: false } },
    },
    build: {
      ...(single
        ? {
            outDir: 'dist-single',
            emptyOutDir: true,
            cssCodeSplit: false,
            assetsInlineLimit: () => true,
            modulePreload: false,
          }
        : {}),
      // The distribution functions (@stdlib, CommonJS) are pure, but CommonJS cannot say so: without this, a page
      // module that merely reaches src/engine/numerics through an index keeps them, start-up code and all — one
      // of which probes generator support with eval, refused by the page's policy.
      rolldownOptions: { treeshake: { moduleSideEffects: (id: string) => !STDLIB.test(id) } },
    },
    // Dev: the same policy as an HTTP header, loosened only for the dev server's inline React-refresh preamble
    // and its HMR websocket (connect-src 'self' covers ws: to the same host and port).
    server: { host: '127.0.0.1', headers: { 'Content-Security-Policy': policy('dev'), ...isolation } },
    // Preview: the built policy also as a header, so the worker script (which a <meta> cannot reach) runs under it.
    preview: { host: '127.0.0.1', headers: { 'Content-Security-Policy': policy('served'), ...isolation } },
    test: {
      include: ['tests/**/*.test.ts', 'src/**/*.test.ts'],
      environment: 'node',
      testTimeout: 60_000,
    },
  };
});
