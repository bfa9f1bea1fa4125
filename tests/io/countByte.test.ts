import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countByte } from '../../src/io/countByte';

const naive = (b: Uint8Array, v: number, start: number) => {
  let n = 0;
  for (let i = Math.max(0, start); i < b.length; i++) if (b[i] === v) n++;
  return n;
};

describe('countByte', () => {
  it('counts as a byte-by-byte loop does, at any alignment, start and value (property)', () => {
    fc.assert(
      fc.property(
        // bytes drawn mostly near the counted value so that words with 0–4 matches and near misses all occur
        fc.uint8Array({ maxLength: 300 }),
        fc.integer({ min: 0, max: 7 }),
        fc.integer({ min: -3, max: 320 }),
        fc.constantFrom(10, 13, 0, 255, 0x80, 0x7f, 1),
        fc.boolean(),
        (raw, offset, start, value, near) => {
          const buf = new Uint8Array(raw.length + offset);
          buf.set(near ? raw.map((x) => (x < 128 ? value : value ^ (x & 0x81))) : raw, offset);
          const b = buf.subarray(offset);
          expect(countByte(b, value, start)).toBe(naive(b, value, start));
        },
      ),
      { numRuns: 2000 },
    );
  });

  it('counts line feeds in shared memory and in a view that starts mid-word', () => {
    const text = new TextEncoder().encode('a,b\n1,2\n\n3,4\r\n5,6');
    const shared = new Uint8Array(new SharedArrayBuffer(text.length + 3));
    shared.set(text, 3);
    expect(countByte(shared.subarray(3), 10)).toBe(4);
    expect(countByte(shared.subarray(3), 13)).toBe(1);
    expect(countByte(shared, 10, 11)).toBe(2); // the line feeds at 11 and 16 (the text starts at 3)
    expect(countByte(new Uint8Array(0), 10)).toBe(0);
  });
});
