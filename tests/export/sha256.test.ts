import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/engine/numerics/rng';
import { base64ToBytes, bytesToBase64 } from '../../src/io/export/base64';
import { datasetChecksum } from '../../src/io/export/checksum';
import { Sha256, sha256Hex } from '../../src/io/export/sha256';
import type { Dataset } from '../../src/engine/core/data';

const utf8 = (s: string) => new TextEncoder().encode(s);

describe('sha256', () => {
  it('gives the FIPS 180-4 example digests', () => {
    // FIPS 180-4 / NIST CSRC SHA-256 examples ("abc", the 448-bit message) and the empty string; values recalled
    // from memory and equal to node:crypto createHash("sha256") digests
    expect(sha256Hex(utf8('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256Hex(utf8('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq'))).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
    expect(sha256Hex(new Uint8Array(0))).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it('matches Node\u2019s crypto.createHash("sha256") for random data fed in random chunk sizes', () => {
    const rng = createRng(7);
    for (let trial = 0; trial < 30; trial++) {
      const len = Math.floor(rng.next() * 3000);
      const bytes = Uint8Array.from({ length: len }, () => Math.floor(rng.next() * 256));
      const h = new Sha256();
      for (let i = 0; i < len;) {
        const k = 1 + Math.floor(rng.next() * 130);
        h.update(bytes.subarray(i, i + k));
        i += k;
      }
      expect(h.digestHex()).toBe(createHash('sha256').update(bytes).digest('hex'));
    }
  });
});

describe('base64', () => {
  it('matches Node\u2019s Buffer base64 and decodes back, for every length mod 3', () => {
    const rng = createRng(3);
    for (let len = 0; len < 40; len++) {
      const bytes = Uint8Array.from({ length: len }, () => Math.floor(rng.next() * 256));
      const b64 = bytesToBase64(bytes);
      expect(b64).toBe(Buffer.from(bytes).toString('base64'));
      expect(base64ToBytes(b64)).toEqual(bytes);
    }
  });

  it('rejects text that is not base64', () => {
    expect(base64ToBytes('ab$d')).toBeNull();
    expect(base64ToBytes('abcde')).toBeNull();
  });
});

describe('datasetChecksum', () => {
  const data = (): Dataset => ({
    nRows: 3,
    columns: [
      { kind: 'numeric', name: 'age', values: Float64Array.of(31, NaN, 47.5) },
      { kind: 'categorical', name: 'ward', levels: ['A', 'B'], codes: Int32Array.of(0, 1, -1) },
    ],
  });

  it('is the SHA-256 of the documented canonical byte stream', () => {
    const parts: Buffer[] = [];
    const u32 = Buffer.alloc(4);
    u32.writeUInt32LE(3);
    parts.push(u32, Buffer.from('age\0numeric\0'));
    const f = Buffer.alloc(24);
    [31, NaN, 47.5].forEach((v, i) => f.writeDoubleLE(v, 8 * i));
    parts.push(f, Buffer.from('ward\0categorical\0A\0B\0'), Buffer.from([1]));
    const c = Buffer.alloc(12);
    [0, 1, -1].forEach((v, i) => c.writeInt32LE(v, 4 * i));
    parts.push(c);
    expect(datasetChecksum(data())).toBe(createHash('sha256').update(Buffer.concat(parts)).digest('hex'));
  });

  it('changes when one value, a level label or a column name changes', () => {
    const base = datasetChecksum(data());
    const a = data();
    (a.columns[0] as { values: Float64Array }).values[2] = 47.50000000000001;
    const b = data();
    (b.columns[1] as { levels: string[] }).levels[1] = 'C';
    const c = data();
    c.columns[0].name = 'Age';
    for (const d of [a, b, c]) expect(datasetChecksum(d)).not.toBe(base);
    expect(datasetChecksum(data())).toBe(base);
  });
});
