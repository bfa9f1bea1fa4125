import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseSync } from 'vite';
import { describe, expect, it } from 'vitest';
import {
  asScriptComment,
  gatherNotices,
  legalComments,
  normaliseText,
  packageDir,
  readPackage,
  renderNotices,
  textParts,
  type BundledPackage,
} from '../../buildNotices';

// The third-party notices of the builds (buildNotices.ts): every package's licence texts and legal comments, each
// distinct text once, with the packages it covers. Built from small invented packages; no build runs here.

const MIT = (holder: string) =>
  `MIT License\n\nCopyright (c) ${holder}\n\nPermission is hereby granted, free of charge, to any person ...\n`;
const APACHE = '                 Apache License\n           Version 2.0, January 2004\n\n   TERMS AND CONDITIONS ...\n';
const FREEBSD = '* FreeBSD <https://svnweb.freebsd.org/>\n\nCopyright (C) 1993-2004 by Sun Microsystems, Inc.';
const CEPHES = '* Cephes <http://www.netlib.org/cephes/readme>\n\nCopyright (c) 1984-2000 Stephen L. Moshier';
const ATTRIBUTION = 'DEPENDENCIES & ATTRIBUTION\n\nThe library links against the following external libraries:';
const HEADER = '@license Apache-2.0\n\nCopyright (c) 2018 The Stdlib Authors.\n\nLicensed under the Apache License.';
const NOTICE =
  '## Notice\n\nThe original C code is from Cephes.\n\n```text\nCopyright 1984, 1987 by Stephen L. Moshier\n```';

const packages: BundledPackage[] = [
  // the same MIT text with CRLF line ends and trailing blanks is one text
  { name: 'alpha', version: '1.0.0', licence: 'MIT', texts: [MIT('2020 Ann').replace(/\n/g, '  \r\n')] },
  { name: 'beta', version: '2.1.0', licence: 'MIT', texts: [MIT('2020 Ann'), '@license beta\nCopyright Bea'] },
  // Apache text plus attributions, laid out as the @stdlib packages' LICENSE files are
  {
    name: '@math/cos',
    version: '0.2.3',
    texts: [`${APACHE}\n${ATTRIBUTION}\n\n${FREEBSD}\n\n${CEPHES}\n`, `${HEADER}\n\n\n${NOTICE}`],
  },
  { name: '@math/exp', version: '0.2.3', texts: [`${APACHE}\n${ATTRIBUTION}\n\n${FREEBSD}\n`, HEADER] },
  { name: '@math/add', version: '0.2.1', texts: [APACHE, HEADER] },
  { name: 'gamma', version: '0.0.1', licence: 'ISC', texts: [] },
];
const label = (p: BundledPackage) => `${p.name} ${p.version}`;

describe('gatherNotices', () => {
  const groups = gatherNotices(packages);
  const texts = groups.flatMap((g) => g.texts);

  it('gives each distinct text once', () => {
    expect(new Set(texts).size).toBe(texts.length);
    // alpha's and beta's MIT texts differ only in line ends and trailing blanks
    expect(texts.filter((t) => t.startsWith('MIT License'))).toHaveLength(1);
    // one Apache text, one attribution heading, FreeBSD once, Cephes once, one header, one notice, beta's comment
    expect(texts).toHaveLength(1 + 1 + 1 + 1 + 1 + 1 + 1 + 1 + 1);
  });

  it('lists every package, and for each package exactly the parts of its own texts', () => {
    expect(new Set(groups.flatMap((g) => g.packages))).toEqual(new Set(packages.map(label)));
    for (const p of packages.filter((q) => q.texts.length)) {
      const own = new Set(p.texts.flatMap(textParts));
      const listed = new Set(groups.filter((g) => g.packages.includes(label(p))).flatMap((g) => g.texts));
      expect(listed, label(p)).toEqual(own);
    }
  });

  it('shares one list among texts that cover the same packages', () => {
    const cover = (text: string) => groups.find((g) => g.texts.includes(text))!.packages;
    expect(cover(textParts(APACHE)[0])).toEqual(['@math/add 0.2.1', '@math/cos 0.2.3', '@math/exp 0.2.3']);
    expect(cover(textParts(FREEBSD)[0])).toEqual(['@math/cos 0.2.3', '@math/exp 0.2.3']);
    expect(cover(textParts(CEPHES)[0])).toEqual(['@math/cos 0.2.3']);
    // the header and the Apache text cover the same three packages: one group
    expect(groups.find((g) => g.texts.includes(HEADER))!.texts).toContain(textParts(APACHE)[0]);
  });

  it('names the package.json licence of a package that ships no licence text', () => {
    const g = groups.find((x) => x.packages.includes('gamma 0.0.1'))!;
    expect(g.packages).toEqual(['gamma 0.0.1']);
    expect(g.texts).toEqual(['Licence named in package.json: ISC (the package ships no licence text).']);
  });
});

describe('textParts', () => {
  it('splits at the attribution heading, its `* Name <address>` items and a `## Notice` heading', () => {
    expect(textParts(`${APACHE}\n${ATTRIBUTION}\n\n${FREEBSD}\n\n${CEPHES}`)).toEqual([
      normaliseText(APACHE),
      ATTRIBUTION,
      FREEBSD,
      CEPHES,
    ]);
    expect(textParts(`${HEADER}\n\n\n${NOTICE}`)).toEqual([HEADER, NOTICE]);
    // a bullet outside an attribution section, or indented inside one, does not split
    expect(textParts('Terms:\n* Name <x@y.z>\n   * Redistributions ...')).toHaveLength(1);
  });
});

describe('renderNotices and asScriptComment', () => {
  const text = renderNotices(gatherNotices(packages));

  it('prints each text once and every package', () => {
    for (const t of gatherNotices(packages).flatMap((g) => g.texts)) expect(text.split(t).length - 1, t).toBe(1);
    for (const p of packages) expect(text).toContain(label(p));
    expect(text).toContain(`bundles ${packages.length} open-source packages`);
  });

  it('is one block comment even when a text contains */', () => {
    const comment = asScriptComment(`${text}\nsee a/*b*/c */ end`);
    const r = parseSync('x.js', `${comment}\nlet x = 1;`);
    expect(r.errors).toEqual([]);
    expect(r.comments).toHaveLength(1);
    expect(r.program.body).toHaveLength(1);
    expect(r.comments[0].value).toContain('see a/*b*\\/c *\\/ end');
  });
});

describe('legalComments', () => {
  it('takes the comments a minifier keeps (@license, @preserve, /*! and //!), not text in strings or regexes', () => {
    const source = [
      '/*! keep one */',
      '/**\n * @license MIT\n * Copyright (c) 2021 Someone\n */',
      '/* plain, dropped */',
      '// plain line, dropped',
      '//! keep line',
      "const s = '/*! a string, not a comment */';",
      'const r = /\\/*! @license in a regex/;',
      'function f() { /* @preserve inner */ return s + r; }',
    ].join('\n');
    expect(legalComments(source, 'm.js')).toEqual([
      'keep one',
      '@license MIT\nCopyright (c) 2021 Someone',
      'keep line',
      '@preserve inner',
    ]);
  });
});

describe('packages in node_modules', () => {
  it('finds the package folder of a module id, scoped, nested or with a query', () => {
    expect(packageDir('/p/node_modules/@stdlib/math-base-special-gamma/lib/main.js')).toBe(
      '/p/node_modules/@stdlib/math-base-special-gamma',
    );
    expect(packageDir('/p/node_modules/a/node_modules/b/index.js?commonjs-proxy')).toBe(
      '/p/node_modules/a/node_modules/b',
    );
    expect(packageDir('C:\\p\\node_modules\\react\\index.js')).toBe('C:/p/node_modules/react');
    expect(packageDir('/p/src/engine/core/data.ts')).toBeNull();
  });

  it("reads an installed package's name, version and licence files (LICENSE and NOTICE of an @stdlib package)", () => {
    const dir = join(process.cwd(), 'node_modules', '@stdlib', 'math-base-special-betainc');
    const pkg = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8')) as { version: string; license: string };
    const p = readPackage(dir);
    expect([p.name, p.version, p.licence]).toEqual(['@stdlib/math-base-special-betainc', pkg.version, pkg.license]);
    expect(p.texts).toEqual([readFileSync(join(dir, 'LICENSE'), 'utf8'), readFileSync(join(dir, 'NOTICE'), 'utf8')]);
    expect(p.texts[1]).toMatch(/Copyright \(c\) \d{4}-\d{4} The Stdlib Authors/);
  });
});
