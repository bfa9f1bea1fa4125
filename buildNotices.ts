import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseSync, type Plugin } from 'vite';

/**
 * Third-party notices of the built app, gathered in one place. The minifier used to keep each bundled module's
 * licence header where it stood (the single file carried ~460 of them, mostly the same Apache header of the
 * distribution functions, inside the worker's script text); the builds now drop every comment from the code and
 * instead carry each distinct licence or notice text once, after the list of the packages it covers: the
 * package's own licence files (LICENSE, LICENCE, COPYING, NOTICE) and every legal comment of its bundled modules —
 * the comments the minifier would keep (containing @license or @preserve, or starting with `/*!` or `//!`).
 */

/** One bundled package and the texts that must travel with it. */
export interface BundledPackage {
  name: string;
  version: string;
  /** The package.json `license` field, when it is a string. */
  licence?: string;
  /** Licence files, then legal comments of its modules, each as read (normalised and split by gatherNotices). */
  texts: string[];
}

/** Distinct texts that apply to the same packages (`name version`, sorted). */
export interface NoticeGroup {
  texts: string[];
  packages: string[];
}

/**
 * The same words with different line ends, indentation, trailing blanks, JSDoc stars or surrounding blank lines
 * are one text: CRLF/CR to LF, a leading ` * ` of each line of a block comment, trailing spaces, blank lines at
 * either end and the indentation common to all lines dropped.
 */
export function normaliseText(text: string, comment = false): string {
  let lines = text.replace(/\r\n?/g, '\n').split('\n');
  if (comment) lines = lines.map((l) => l.replace(/^\s*\*(?: |$)?/, ''));
  lines = lines.map((l) => l.replace(/\s+$/, ''));
  while (lines.length && !lines[0]) lines.shift();
  while (lines.length && !lines[lines.length - 1]) lines.pop();
  const indent = Math.min(...lines.filter((l) => l).map((l) => /^ */.exec(l)![0].length));
  return lines.map((l) => l.slice(indent)).join('\n');
}

/**
 * Each distinct text once, with every package it applies to; texts that apply to exactly the same packages share
 * one list. A package that ships no licence text and carries no legal comment is still listed, under the licence
 * its package.json names. Groups come in the order of their first package (sorted by name and version), so the
 * output is the same for the same packages.
 */
export function gatherNotices(packages: readonly BundledPackage[]): NoticeGroup[] {
  const label = (p: BundledPackage) => `${p.name} ${p.version}`;
  const byText = new Map<string, Set<string>>();
  const add = (text: string, who: string) => {
    const set = byText.get(text) ?? new Set<string>();
    set.add(who);
    byText.set(text, set);
  };
  const sorted = [...packages].sort((a, b) => (label(a) < label(b) ? -1 : label(a) > label(b) ? 1 : 0));
  for (const p of sorted) {
    const texts = p.texts.flatMap(textParts);
    if (!texts.length)
      add(`Licence named in package.json: ${p.licence ?? 'none'} (the package ships no licence text).`, label(p));
    for (const t of texts) add(t, label(p));
  }
  const groups = new Map<string, NoticeGroup>();
  for (const [text, who] of byText) {
    const packages = [...who].sort();
    const key = packages.join('\n');
    const g = groups.get(key);
    if (g) g.texts.push(text);
    else groups.set(key, { texts: [text], packages });
  }
  return [...groups.values()];
}

const RULE = '='.repeat(100);
const THIN = '-'.repeat(40);

/** The groups as one plain-text notices section. */
export function renderNotices(groups: readonly NoticeGroup[]): string {
  const count = new Set(groups.flatMap((g) => g.packages)).size;
  const head =
    'Third-party notices\n\n' +
    `Fulcra bundles ${count} open-source packages. Each licence or notice text below is given once, after the\n` +
    'packages (name and version) it applies to.\n';
  const body = groups.map(
    (g) => `${RULE}\nApplies to: ${wrap(g.packages.join(', '), 100)}\n${RULE}\n\n${g.texts.join(`\n\n${THIN}\n\n`)}\n`,
  );
  return [head, ...body].join('\n');
}

/** Breaks a comma-separated list into lines of at most `width` characters (an item longer than that stands alone). */
function wrap(list: string, width: number): string {
  const lines: string[] = [];
  let line = '';
  for (const item of list.split(', ')) {
    const next = line ? `${line}, ${item}` : item;
    if (line && next.length > width) {
      lines.push(line + ',');
      line = item;
    } else line = next;
  }
  if (line) lines.push(line);
  return lines.join('\n  ');
}

/** The notices as one JavaScript block comment (a `*\/` in a text cannot end it early). */
export function asScriptComment(text: string): string {
  return `/*\n${text.replace(/\*\//g, '*\\/')}\n*/`;
}

/**
 * The legal comments of a module's source, the ones a minifier keeps: a comment containing @license or
 * @preserve, or starting with `!`. Found by parsing, so comment-like text in strings or regexes is not taken.
 */
export function legalComments(source: string, file: string): string[] {
  const { comments } = parseSync(file.replace(/\.(cjs|mjs)$/, '.js'), source, { sourceType: 'unambiguous' });
  return comments
    .filter((c) => /@license|@preserve/.test(c.value) || c.value.startsWith('!'))
    .map((c) => normaliseText(c.value.replace(/^!/, ''), c.type === 'Block'));
}

/** The folder of the package a module in node_modules belongs to (`…/node_modules/@scope/name`), or null. */
export function packageDir(moduleId: string): string | null {
  const path = moduleId.replace(/[?#].*$/, '').replace(/\\/g, '/');
  const m = /^(.*\/node_modules\/(?:@[^/]+\/)?[^/]+)\//.exec(path);
  return m ? m[1] : null;
}

const LICENCE_FILE = /^(?:licen[cs]e|copying|notice)(?:[.\-_].*)?$/i;

/**
 * A text in the parts that packages share. The @stdlib packages (~230 in the build) repeat one Apache-2.0 text in
 * their LICENSE files and one Apache header in their modules' comments, followed where the code derives from other
 * work by a `DEPENDENCIES & ATTRIBUTION` section of `* Name <address>` items (LICENSE) or a `## Notice` section
 * (comments) naming the original's copyright and licence (FreeBSD, Cephes, Boost…). Split at those lines, each
 * part is given once; any other text is one part.
 */
export function textParts(text: string): string[] {
  const parts: string[][] = [[]];
  let attribution = false;
  for (const line of normaliseText(text).split('\n')) {
    const heading = line === 'DEPENDENCIES & ATTRIBUTION' || line === '## Notice';
    if (heading || (attribution && /^\* \S.*<\S+>$/.test(line))) parts.push([]);
    if (line === 'DEPENDENCIES & ATTRIBUTION') attribution = true;
    parts[parts.length - 1].push(line);
  }
  return parts.map((p) => normaliseText(p.join('\n'))).filter((p) => p);
}

/** A package's name, version, licence field and licence files (sorted by file name). */
export function readPackage(dir: string): BundledPackage {
  const pkg = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8')) as {
    name?: string;
    version?: string;
    license?: unknown;
  };
  const files = readdirSync(dir, { withFileTypes: true })
    .filter((e) => e.isFile() && LICENCE_FILE.test(e.name))
    .map((e) => e.name)
    .sort();
  return {
    name: pkg.name ?? dir.split('/').pop()!,
    version: pkg.version ?? 'unknown',
    ...(typeof pkg.license === 'string' ? { licence: pkg.license } : {}),
    texts: files.map((f) => readFileSync(join(dir, f), 'utf8')),
  };
}

/**
 * Collects, over the page build and every worker build of one `vite build`, the node_modules modules that left
 * code in a chunk; `packages()` then reads their packages' licence files and legal comments.
 */
export function noticeCollector(): { plugin: () => Plugin; packages: () => BundledPackage[] } {
  const modules = new Set<string>();
  return {
    plugin: () => ({
      name: 'fulcra:notice-collector',
      apply: 'build',
      generateBundle(_options, bundle) {
        for (const out of Object.values(bundle))
          if (out.type === 'chunk')
            for (const [id, m] of Object.entries(out.modules))
              if (m.renderedLength > 0 && !id.startsWith('\0') && packageDir(id)) modules.add(id);
      },
    }),
    packages: () => {
      const byDir = new Map<string, { ids: string[] }>();
      for (const id of [...modules].sort()) {
        const dir = packageDir(id)!;
        const entry = byDir.get(dir) ?? { ids: [] };
        entry.ids.push(id.replace(/[?#].*$/, ''));
        byDir.set(dir, entry);
      }
      return [...byDir].map(([dir, { ids }]) => {
        const p = readPackage(dir);
        const comments = new Set<string>();
        for (const id of ids)
          if (existsSync(id)) for (const c of legalComments(readFileSync(id, 'utf8'), id)) comments.add(c);
        return { ...p, texts: [...p.texts, ...comments] };
      });
    },
  };
}

/** The notices section of everything one build collected. */
export function noticesText(notices: ReturnType<typeof noticeCollector>): string {
  return renderNotices(gatherNotices(notices.packages()));
}
