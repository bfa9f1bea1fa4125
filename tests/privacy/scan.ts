import { transformSync, type Loader } from 'esbuild';

/**
 * Static privacy checks shared by the source and bundle scans. Comments are removed by parsing (esbuild, legal
 * comments dropped), so a URL in a comment or doc block is fine while the same URL in a string, template or JSX
 * text — anything that ships as code — is reported.
 */

/** The code of a file without its comments; CSS and HTML comments too. */
export function codeWithoutComments(source: string, file: string): string {
  if (/\.html?$/i.test(file)) return source.replace(/<!--[\s\S]*?-->/g, '');
  const ext = (/\.(tsx|ts|jsx|mjs|cjs|js|css)$/i.exec(file)?.[1] ?? 'js').toLowerCase();
  const loader: Loader = ext === 'mjs' || ext === 'cjs' ? 'js' : (ext as Loader);
  return transformSync(source, { loader, legalComments: 'none', jsx: 'preserve', sourcefile: file, logLevel: 'silent' })
    .code;
}

/** Constructs that run text as code or as HTML. */
export const FORBIDDEN: readonly { name: string; pattern: RegExp }[] = [
  { name: 'dangerouslySetInnerHTML', pattern: /\bdangerouslySetInnerHTML\b/ },
  { name: 'eval(', pattern: /(?<![\w$.])eval\s*\(/ },
  { name: 'new Function(', pattern: /\bnew\s+Function\s*\(/ },
  { name: 'innerHTML =', pattern: /\.(?:inner|outer)HTML\s*\+?=(?!=)/ },
  { name: 'insertAdjacentHTML(', pattern: /\binsertAdjacentHTML\s*\(/ },
  { name: 'document.write(', pattern: /\bdocument\s*\.\s*write(?:ln)?\s*\(/ },
];

/**
 * URLs allowed in code: the loopback address (local benchmarks) and XML namespace names, which are identifiers and
 * are never requested — SVG/XLink/MathML/XML (w3.org), PMML (dmg.org), and the Office Open XML relationship
 * namespaces a workbook reader compares against (openxmlformats.org, purl.oclc.org).
 */
export const ALLOWED_URLS: readonly RegExp[] = [
  /^http:\/\/127\.0\.0\.1(?::\d+)?(?:\/|$)/,
  /^http:\/\/www\.w3\.org\//,
  /^http:\/\/www\.dmg\.org\/PMML-\d_\d$/,
  /^http:\/\/schemas\.openxmlformats\.org\//,
  /^http:\/\/purl\.oclc\.org\/ooxml\//,
];

const URL_RE = /https?:\/\/[^\s'"`<>(){}\\,;]+/gi;

export interface Finding {
  file: string;
  line: number;
  what: string;
  text: string;
}

function lineOf(code: string, index: number): number {
  let n = 1;
  for (let i = 0; i < index; i++) if (code.charCodeAt(i) === 10) n++;
  return n;
}

/** Forbidden constructs and absolute http(s) URLs not on the allowed list, in comment-free code. */
export function scanCode(code: string, file: string, extraAllowed: readonly RegExp[] = []): Finding[] {
  const out: Finding[] = [];
  for (const f of FORBIDDEN) {
    const re = new RegExp(f.pattern.source, 'g');
    for (const m of code.matchAll(re))
      out.push({ file, line: lineOf(code, m.index!), what: f.name, text: code.slice(m.index!, m.index! + 60) });
  }
  for (const m of code.matchAll(URL_RE)) {
    const url = m[0];
    if ([...ALLOWED_URLS, ...extraAllowed].some((a) => a.test(url))) continue;
    out.push({ file, line: lineOf(code, m.index!), what: 'absolute URL', text: url });
  }
  return out;
}

/** Whether a URL literal points outside the machine: absolute http(s)/ws(s) or protocol-relative, not loopback. */
function outside(url: string): boolean {
  return (
    /^(?:(?:https?|wss?):)?\/\//i.test(url) &&
    !/^(?:(?:https?|wss?):)?\/\/(?:127\.0\.0\.1|localhost)(?::\d+)?(?:\/|$)/i.test(url)
  );
}

const LITERAL = String.raw`([\x60'"])((?:(?!\1)[^\\]|\\.)*)\1`;
const NETWORK_CALLS: readonly { name: string; pattern: RegExp }[] = [
  { name: 'fetch', pattern: new RegExp(String.raw`\bfetch\s*\(\s*` + LITERAL, 'g') },
  {
    name: 'XMLHttpRequest.open',
    pattern: new RegExp(String.raw`\.open\s*\(\s*[\x60'"][A-Za-z]+[\x60'"]\s*,\s*` + LITERAL, 'g'),
  },
  {
    name: 'WebSocket/EventSource/Worker',
    pattern: new RegExp(String.raw`\bnew\s+(?:WebSocket|EventSource|Worker|SharedWorker)\s*\(\s*` + LITERAL, 'g'),
  },
  { name: 'sendBeacon', pattern: new RegExp(String.raw`\bsendBeacon\s*\(\s*` + LITERAL, 'g') },
  { name: 'importScripts', pattern: new RegExp(String.raw`\bimportScripts\s*\(\s*` + LITERAL, 'g') },
  { name: 'src/href assignment', pattern: new RegExp(String.raw`\.(?:src|href)\s*=\s*` + LITERAL, 'g') },
];

/**
 * Network calls (fetch, XMLHttpRequest.open, WebSocket, EventSource, workers, sendBeacon, importScripts, src/href
 * assignments) whose address is a literal pointing outside the machine. Addresses built elsewhere are caught by the
 * URL check of `scanCode`.
 */
export function scanNetworkCalls(code: string, file: string): Finding[] {
  const out: Finding[] = [];
  for (const c of NETWORK_CALLS) {
    for (const m of code.matchAll(c.pattern)) {
      if (outside(m[2]))
        out.push({
          file,
          line: lineOf(code, m.index!),
          what: `${c.name} to an outside address`,
          text: code.slice(m.index!, m.index! + 120),
        });
    }
  }
  return out;
}

export const describeFindings = (fs: Finding[]) => fs.map((f) => `${f.file}:${f.line} ${f.what}: ${f.text}`).join('\n');

const WINDOW_OPEN = /(?:\b(?:window|self|globalThis|top|parent)\s*\.\s*|(?<![\w$.]))open\s*\(/g;
const NAVIGATE = /\blocation\s*(?:\.\s*href\s*)?=(?!=)|\blocation\s*\.\s*(?:assign|replace)\s*\(/g;
const FORM_ACTION =
  /(?:<form\b[^>]*?\saction|\bformaction|\.\s*(?:action|formAction)|\b(?:action|formAction)\s*:)\s*=?\s*\{?\s*/gi;
const LITERAL_AT = new RegExp('^' + LITERAL);

/** The string literal starting at `code[at]` (after spaces), or null when the text there is not a literal. */
function literalAt(code: string, at: number): string | null {
  const m = LITERAL_AT.exec(code.slice(at).trimStart());
  return m ? m[2] : null;
}

/**
 * Ways code can send the user (and data in an address) away, which no Content-Security-Policy stops: windows opened
 * (window.open), navigation (assignments to location or location.href, location.assign/replace) and forms posted to
 * an outside address (form action, formAction). A literal outside address is always reported; a target that is not
 * a literal is reported as "address not a literal" (the source scan allows none; the bundle scan lists the library
 * sites it knows). Look-ups (location.search), fragment moves (location.hash) and other `open` methods
 * (indexedDB.open, XMLHttpRequest.open) are not reported.
 */
export function scanNavigation(code: string, file: string): Finding[] {
  const out: Finding[] = [];
  const add = (index: number, what: string, target: string | null) => {
    if (target !== null && !outside(target)) return;
    out.push({
      file,
      line: lineOf(code, index),
      what: `${what} ${target === null ? '(address not a literal)' : 'to an outside address'}`,
      text: code.slice(index, index + 120),
    });
  };
  for (const m of code.matchAll(WINDOW_OPEN)) {
    const at = m.index! + m[0].length;
    const close = code.indexOf(')', at);
    const after = code.slice(close + 1, close + 40).trimStart();
    if (/function\s+$/.test(code.slice(Math.max(0, m.index! - 12), m.index!)) || after.startsWith('{')) continue;
    const args = code.slice(at, close).trim();
    if (args === '') continue; // open() with no address: a blank window of this page
    add(m.index!, 'window.open', literalAt(code, at));
  }
  for (const m of code.matchAll(NAVIGATE)) add(m.index!, 'navigation', literalAt(code, m.index! + m[0].length));
  for (const m of code.matchAll(FORM_ACTION)) {
    const target = literalAt(code, m.index! + m[0].length);
    if (target !== null) add(m.index!, 'form action', target);
  }
  return out;
}
