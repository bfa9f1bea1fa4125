import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  codeWithoutComments,
  describeFindings,
  scanCode,
  scanNavigation,
  scanNetworkCalls,
  type Finding,
} from './scan';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const CODE = /\.(ts|tsx|js|jsx|mjs|cjs|css|html)$/i;

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? walk(p) : CODE.test(name) ? [p] : [];
  });
}

describe('scanner self-check', () => {
  it('reports a URL in a string but not in a comment, and each forbidden construct', () => {
    const src = [
      '// see https://example.org/docs',
      '/** https://example.org/more */',
      'const u = "https://tracker.example.com/collect";',
      'el.innerHTML = x; eval("1"); const f = new Function("a", "b");',
      'const ok = "http://www.w3.org/2000/svg"; const local = "http://127.0.0.1:4190/";',
      'const t = <div dangerouslySetInnerHTML={{ __html: s }} />;',
    ].join('\n');
    const found = scanCode(codeWithoutComments(src, 'probe.tsx'), 'probe.tsx');
    expect(found.map((f) => f.what).sort()).toEqual(
      ['absolute URL', 'dangerouslySetInnerHTML', 'eval(', 'innerHTML =', 'new Function('].sort(),
    );
    expect(found.find((f) => f.what === 'absolute URL')!.text).toBe('https://tracker.example.com/collect');
  });

  it('does not mistake comparisons, method names or retrieval( for the forbidden constructs', () => {
    const src = 'if (el.innerHTML === "") retrieval(x); obj.eval; const evaluate = (a: number) => a;';
    expect(scanCode(codeWithoutComments(src, 'probe.ts'), 'probe.ts')).toEqual([]);
  });

  it('reports network calls to outside addresses but not to relative or loopback ones', () => {
    const bad = [
      'fetch("https://x.example/collect", { method: "POST" })',
      'new WebSocket(`wss://live.example.net/s`)',
      'navigator.sendBeacon("//cdn.example.com/b", d)',
      "importScripts('https://cdn.example.com/lib.js')",
      'x.open("GET", "https://api.example.com/v1")',
      'script.src = "https://cdn.example.com/a.js"',
    ];
    for (const b of bad) expect(scanNetworkCalls(b, 'probe.js'), b).toHaveLength(1);
    const good = [
      'fetch(link.href, opts)',
      'new Worker(new URL("./w.js", import.meta.url))',
      'fetch("http://127.0.0.1:4190/run")',
    ];
    for (const g of good) expect(scanNetworkCalls(g, 'probe.js'), g).toEqual([]);
  });
  it('reports windows opened, navigation away and form actions, but not look-ups or local moves', () => {
    const outside = [
      "window.open('https://x.example/?leak=1')",
      "open(`https://x.example/`, '_blank')",
      "self.open('//x.example/')",
      "location.href = 'https://x.example/'",
      "window.location = 'https://x.example/'",
      "location.assign('https://x.example/')",
      'document.location.replace("//x.example")',
      '<form action="https://x.example/post">',
      "form.action = 'https://x.example/post'",
      "button.formAction = 'https://x.example/post'",
      'const f = <form action="https://x.example/post" />;',
    ];
    for (const b of outside) {
      const found = scanNavigation(codeWithoutComments(b, /^</.test(b) ? 'p.html' : 'p.tsx'), 'p');
      expect(found, b).toHaveLength(1);
      expect(found[0].what, b).toMatch(/outside address/);
    }
    const unknown = ['window.open(url)', 'location.href = next', 'w.location.assign(u)', 'open(e, "_blank")'];
    for (const b of unknown)
      expect(
        scanNavigation(b, 'p').map((f) => f.what),
        b,
      ).toEqual([expect.stringMatching(/address not a literal/)]);
    const fine = [
      "indexedDB.open('fulcra')",
      "xhr.open('GET', '/local')",
      'const q = new URLSearchParams(location.search);',
      'if (location.href === x) y();',
      "location.hash = '#model'",
      "const db = await idb.open('x')",
      'class A { open() { return 1; } }',
      'function open(a) { return a; }',
    ];
    for (const g of fine) expect(scanNavigation(g, 'p'), g).toEqual([]);
  });
});

describe('source privacy scan', () => {
  const files = [...walk(join(ROOT, 'src')), join(ROOT, 'index.html')];

  // jsPDF can load pdfobject from a CDN (output 'pdfobjectnewwindow') and pulls html2canvas/canvg/DOMPurify for
  // .html() and addSvgAsImage(); Fulcra must only ask it for the document in memory.
  it('asks jsPDF only for an in-memory document (no window outputs, no .save(), no .html(), no addSvgAsImage)', () => {
    const findings: Finding[] = [];
    for (const f of files.filter((x) => /\.(ts|tsx)$/.test(x))) {
      const code = codeWithoutComments(readFileSync(f, 'utf8'), f);
      for (const m of code.matchAll(/\.output\(\s*(["'`])([^"'`]*)\1/g)) {
        if (!['arraybuffer', 'blob'].includes(m[2]))
          findings.push({ file: relative(ROOT, f), line: 0, what: `jsPDF output "${m[2]}"`, text: m[0] });
      }
      for (const m of code.matchAll(/\b(addSvgAsImage|doc\.html|pdf\.html|doc\.save|pdf\.save)\s*\(/g))
        findings.push({ file: relative(ROOT, f), line: 0, what: m[1], text: m[0] });
    }
    expect(findings, describeFindings(findings)).toEqual([]);
  });

  it('finds the source files', () => expect(files.length).toBeGreaterThan(20));

  it('never opens a window, navigates away or posts a form (window.open, location, form actions)', () => {
    const findings: Finding[] = [];
    for (const f of files)
      findings.push(...scanNavigation(codeWithoutComments(readFileSync(f, 'utf8'), f), relative(ROOT, f)));
    expect(findings, describeFindings(findings)).toEqual([]);
  });

  it('has no innerHTML/eval/new Function/dangerouslySetInnerHTML and no outside URL in src/ or index.html', () => {
    const findings: Finding[] = [];
    for (const f of files) {
      const rel = relative(ROOT, f);
      findings.push(...scanCode(codeWithoutComments(readFileSync(f, 'utf8'), f), rel));
    }
    expect(findings, describeFindings(findings)).toEqual([]);
  });
});
