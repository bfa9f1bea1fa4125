import { readdirSync, readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';
import { importFile } from '../../src/io/index';
import { nonFinitePaths, stem } from './walk';

const DIR = new URL('../fixtures/bad-input/', import.meta.url);
const workbooks = readdirSync(DIR)
  .filter((f) => f.endsWith('.xlsx'))
  .map((f) => new Uint8Array(readFileSync(new URL(f, DIR))));

/** Real workbooks with bytes overwritten, truncated workbooks, and random bytes behind a zip signature. */
const damaged = fc.oneof(
  fc
    .tuple(
      fc.constantFrom(...workbooks),
      fc.array(fc.tuple(fc.nat(), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 20 }),
    )
    .map(([g, edits]) => {
      const b = g.slice();
      for (const [i, v] of edits) b[i % b.length] = v;
      return b;
    }),
  fc.tuple(fc.constantFrom(...workbooks), fc.nat()).map(([g, cut]) => g.slice(0, cut % g.length)),
  fc.uint8Array({ maxLength: 400 }).map((a) => Uint8Array.from([0x50, 0x4b, 0x03, 0x04, ...a])),
);

const documentedNaN = (path: string, v: number) =>
  Number.isNaN(v) &&
  (stem(path) === 'dataset.columns.values' || /^columns\.profile\.(min|median|max)$/.test(stem(path)));

describe('workbook import under damaged files', () => {
  it('has workbooks to damage', () => expect(workbooks.length).toBeGreaterThan(0));

  it('throws only FulcraError for damaged, truncated or fake workbooks, and any result is finite', async () => {
    await fc.assert(
      fc.asyncProperty(damaged, async (bytes) => {
        try {
          const r = await importFile(bytes, 'damaged.xlsx');
          expect(nonFinitePaths(r, documentedNaN)).toEqual([]);
        } catch (e) {
          if (!(e instanceof FulcraError)) throw e;
        }
      }),
      { numRuns: 150, seed: 1202, endOnFailure: true },
    );
  });
});
