import { afterEach, describe, expect, it } from 'vitest';
import { importFile } from '../../src/io';
import {
  answerPart,
  appendPart,
  cutPoints,
  installPartReaders,
  messagePartReaders,
  readPart,
  type PartJob,
  type PartReaders,
  type TablePart,
} from '../../src/io/parallelParse';
import { createRng } from '../../src/engine/numerics/rng';
import type { ImportOptions } from '../../src/io/types';

// Reading a file in parts must give what reading it on one thread gives: the same dataset, column profiles, format
// and messages (row numbers included). The helpers here run inline, on this thread, through the same structured
// clone a worker's message makes.
afterEach(() => installPartReaders(null));

/** Part readers that read each part here; `jobs` records what they were asked. */
function inlineReaders(helpers: number, jobs: PartJob[] = [], fail = false): PartReaders {
  return {
    helpers,
    read: async (job) => {
      jobs.push(job);
      if (fail) throw new Error('helper gone');
      return structuredClone(readPart(structuredClone(job))) as TablePart;
    },
  };
}

/** An invented registry file: numbers, text, missing tokens, blank and short lines, units, leading zeros. */
function registry(rows: number, seed: number, o: { sep?: string; eol?: string; long?: number } = {}): string {
  const rng = createRng(seed);
  const sep = o.sep ?? ',',
    eol = o.eol ?? '\n';
  const dec = (x: number) => (sep === ';' ? String(x).replace('.', ',') : String(x));
  const lines = [['age', 'weight (kg)', 'ward', 'code', 'score', 'infected'].join(sep)];
  for (let i = 0; i < rows; i++) {
    const u = rng.next();
    if (u < 0.01) {
      lines.push(u < 0.005 ? '' : sep.repeat(5)); // blank lines
      continue;
    }
    const cells = [
      rng.next() < 0.03 ? 'NA' : String(20 + Math.floor(rng.next() * 70)),
      rng.next() < 0.02 ? '' : dec(Math.round(rng.next() * 1e4) / 100) + (rng.next() < 0.5 ? ' kg' : ''),
      rng.next() < 0.01 ? '#N/A' : ['ward A', 'ward B', 'Süd', 'ICU'][Math.floor(rng.next() * 4)],
      rng.next() < 0.05 ? '007' : rng.next() < 0.01 ? ' 12 ' : String(Math.floor(rng.next() * 100)),
      rng.next() < 0.002 ? 'n/a later' : dec(Math.round((rng.next() - 0.5) * 1e6) / 1e3),
      rng.next() < 0.3 ? '1' : '0',
    ];
    if (rng.next() < 0.01) cells.length = 4; // a short row
    if (o.long !== undefined && i === o.long) cells.push('extra');
    lines.push(cells.join(sep));
  }
  return lines.join(eol) + (rng.next() < 0.5 ? eol : '');
}

const options: ImportOptions = { stripUnits: ['weight (kg)'] };

async function bothWays(text: string | Uint8Array, helpers: number, opts: ImportOptions = options) {
  const bytes = typeof text === 'string' ? new TextEncoder().encode(text) : text;
  const one = await importFile(bytes, 'registry.csv', opts);
  const jobs: PartJob[] = [];
  installPartReaders(inlineReaders(helpers, jobs), 1);
  const parts = await importFile(bytes, 'registry.csv', opts);
  installPartReaders(null);
  return { one, parts, jobs };
}

describe('reading a delimited file in parts', () => {
  it('gives the one-thread result with 1, 2 and 3 helpers (comma, LF; semicolon and decimal comma, CRLF)', async () => {
    for (const [k, shape] of [{}, { sep: ';', eol: '\r\n' }].entries()) {
      const text = registry(3000, 11 + k, shape);
      for (const helpers of [1, 2, 3]) {
        const { one, parts, jobs } = await bothWays(text, helpers);
        expect(jobs.length).toBe(helpers);
        expect(parts).toEqual(one);
      }
    }
  });

  it("uses the helpers' parts (a part altered by its helper shows in the result)", async () => {
    const lines = ['x,y'];
    for (let i = 0; i < 2000; i++) lines.push(`${i},${i % 2}`);
    const bytes = new TextEncoder().encode(lines.join('\n'));
    installPartReaders(
      {
        helpers: 1,
        read: async (job) => {
          const part = readPart(job);
          part.cols[0].values[0] = -1;
          return part;
        },
      },
      1,
    );
    const r = await importFile(bytes, 'x.csv');
    const x = r.dataset.columns[0];
    const first = x.kind === 'numeric' ? Array.from(x.values).indexOf(-1) : -1;
    expect(first).toBeGreaterThan(500); // the second part's first row
    expect(x.kind === 'numeric' && x.values[first - 1]).toBe(first - 1);
  });

  it('gives the one-thread result for a column whose first text cell is in a later part', async () => {
    const lines = ['x,y'];
    for (let i = 0; i < 2000; i++) lines.push(`${i % 7},${i === 1700 ? 'unknown' : i % 2}`);
    const { one, parts, jobs } = await bothWays(lines.join('\n'), 2, {});
    expect(jobs.length).toBe(2);
    expect(parts).toEqual(one);
    expect(parts.warnings.length).toBeGreaterThan(0);
  });

  it('falls back to one thread for a row wider than the header in a later part, and when a helper fails', async () => {
    const text = registry(3000, 5, { long: 2500 });
    const { one, parts, jobs } = await bothWays(text, 2);
    expect(jobs.length).toBe(2);
    expect(parts).toEqual(one);
    installPartReaders(inlineReaders(1, [], true), 1);
    expect(await importFile(new TextEncoder().encode(registry(2000, 6)), 'r.csv', options)).toEqual(
      await (async () => {
        installPartReaders(null);
        return importFile(new TextEncoder().encode(registry(2000, 6)), 'r.csv', options);
      })(),
    );
  });

  it('is not used for a file with a quote, without a header, or below the size set', async () => {
    const jobs: PartJob[] = [];
    installPartReaders(inlineReaders(2, jobs), 1);
    await importFile(new TextEncoder().encode('a,b\n"x",1\ny,2\nz,3\n'), 'q.csv');
    await importFile(new TextEncoder().encode('1,2\n3,4\n5,6\n'), 'n.csv', { header: false });
    installPartReaders(inlineReaders(2, jobs), 1e9);
    await importFile(new TextEncoder().encode(registry(500, 3)), 'r.csv', options);
    expect(jobs.length).toBe(0);
  });

  it('reads invalid UTF-8 in a later part as Windows-1252, as one thread does', async () => {
    const enc = (t: string) => Array.from(new TextEncoder().encode(t));
    // é as Windows-1252 writes it (0xE9), which is not UTF-8, in the last line
    const bytes = Uint8Array.from([...enc(registry(2000, 8).trimEnd() + '\n30,5,'), 0xe9, ...enc('t,1,2,1\n')]);
    const { one, parts } = await bothWays(bytes, 2);
    expect(one.warnings.some((w) => w.code === 'encoding-fallback')).toBe(true);
    expect(parts).toEqual(one);
  });
});

describe('a file in shared memory (npm run fit reads a large file so)', () => {
  it('is read in parts in place, the parts being views of its bytes, to the one-thread result', async () => {
    const text = new TextEncoder().encode(registry(3000, 31));
    const shared = new Uint8Array(new SharedArrayBuffer(text.length));
    shared.set(text);
    const { one, parts, jobs } = await bothWays(shared, 2);
    expect(jobs.map((j) => j.part.buffer === shared.buffer)).toEqual([true, true]);
    expect(parts).toEqual(one);
    expect(parts).toEqual(await importFile(text, 'registry.csv', options));
  });
});

describe('cutPoints and appendPart', () => {
  it('cuts just after line feeds, and not at all with a quote or without line feeds', () => {
    const b = new TextEncoder().encode('h\n1\n22\n333\n4444\n');
    const cuts = cutPoints(b, 2, 3)!;
    expect(cuts.length).toBeGreaterThan(0);
    for (const c of cuts) expect(b[c - 1]).toBe(10);
    expect(cutPoints(new TextEncoder().encode('h\n"1"\n2\n'), 2, 2)).toBeNull();
    expect(cutPoints(new TextEncoder().encode('h\r1\r2\r'), 0, 2)).toBeNull();
  });

  it('refuses a part whose columns do not line up, leaving the table as it was', async () => {
    const job: PartJob = {
      header: new TextEncoder().encode('a,b\n'),
      part: new TextEncoder().encode('1,2,3\n'),
      encoding: 'utf-8',
      delimiter: ',',
      decimalComma: false,
      missingTokens: [],
      stripUnits: [],
      fatal: false,
    };
    const wide = readPart(job);
    const narrow = readPart({ ...job, part: new TextEncoder().encode('1,2\n') });
    const { TableBuilder } = await import('../../src/io/tableBuilder');
    const { CellReader } = await import('../../src/io/cellReader');
    const tb = new TableBuilder(new CellReader(false, []), true, new Set());
    tb.addRecord(['a', 'b'], 2);
    tb.addRecord(['5', '6'], 2);
    expect(appendPart(tb, wide)).toBe(false);
    expect([tb.nRows, tb.records]).toEqual([1, 2]);
    expect(appendPart(tb, narrow)).toBe(true);
    expect([tb.nRows, tb.records, Array.from(tb.rowNumbers())]).toEqual([2, 3, [2, 3]]);
  });
});

describe('part readers over messages (helpers as the page and npm run fit start them)', () => {
  it('reads the parts through MessagePorts, one per helper, and gives the one-thread result', async () => {
    const channels = [new MessageChannel(), new MessageChannel()];
    let answered = 0;
    for (const c of channels) {
      // the helper's side, as src/worker/rowHelper.ts answers
      c.port2.onmessage = (e) => answerPart(e.data, (reply, transfer) => c.port2.postMessage(reply, transfer));
    }
    const readers = messagePartReaders(
      channels.map((c) => ({
        postMessage: (m, transfer) => c.port1.postMessage(m, transfer),
        onReply: (f) =>
          (c.port1.onmessage = (e) => {
            if ((e.data as { part?: unknown }).part) answered++;
            f(e.data);
          }),
      })),
    );
    const bytes = new TextEncoder().encode(registry(3000, 21));
    const one = await importFile(bytes, 'r.csv', options);
    installPartReaders(readers, 1);
    const parts = await importFile(bytes, 'r.csv', options);
    installPartReaders(null);
    for (const c of channels) {
      c.port1.close();
      c.port2.close();
    }
    expect(answered).toBe(2);
    expect(parts).toEqual(one);
  });

  it('fails the parts of a helper that stops or does not answer, and the file is read on one thread', async () => {
    let failed: () => void = () => {};
    const silent = (onFailure?: (f: () => void) => void) =>
      messagePartReaders(
        [{ postMessage: () => {}, onReply: () => {}, onFailure }],
        onFailure ? 60_000 : 50, // the first is told the helper stopped; the second times out
      );
    const bytes = new TextEncoder().encode(registry(2000, 31));
    const one = await importFile(bytes, 'r.csv', options);
    installPartReaders(
      silent((f) => (failed = f)),
      1,
    );
    const stopped = importFile(bytes, 'r.csv', options);
    await new Promise((r) => setTimeout(r, 20));
    failed();
    expect(await stopped).toEqual(one);
    installPartReaders(silent(), 1);
    expect(await importFile(bytes, 'r.csv', options)).toEqual(one);
  });

  it('answers only part messages, and a part it cannot read with an error', () => {
    const replies: unknown[] = [];
    expect(answerPart({ job: {}, k0: 0, k1: 1 }, (r) => replies.push(r))).toBe(false);
    expect(answerPart({ partId: 3, part: { header: null } }, (r) => replies.push(r))).toBe(true);
    expect(replies).toEqual([{ partId: 3, error: expect.any(String) }]);
  });
});
