import type { Dataset } from '../../engine/core';
import { Sha256 } from './sha256';

/**
 * SHA-256 (hex) of a Dataset's content, independent of how it was imported. Canonical byte stream, in column
 * order: for each column the UTF-8 of `name`, a 0 byte, the kind ("numeric"/"categorical"), a 0 byte, then
 * numeric: the values as little-endian IEEE-754 doubles (NaN canonicalised to one bit pattern);
 * categorical: each level's UTF-8 followed by a 0 byte, a 1 byte, then the codes as little-endian int32.
 * Row count is part of the stream (little-endian uint32 first).
 */
export function datasetChecksum(data: Dataset): string {
  const hash = new Sha256();
  const enc = new TextEncoder();
  const zero = new Uint8Array([0]);
  const head = new Uint8Array(4);
  new DataView(head.buffer).setUint32(0, data.nRows, true);
  hash.update(head);
  for (const col of data.columns) {
    hash.update(enc.encode(col.name)).update(zero).update(enc.encode(col.kind)).update(zero);
    if (col.kind === 'numeric') {
      hash.update(littleEndianDoubles(col.values));
    } else {
      for (const level of col.levels) hash.update(enc.encode(level)).update(zero);
      hash.update(new Uint8Array([1]));
      const buf = new Uint8Array(col.codes.length * 4);
      const view = new DataView(buf.buffer);
      for (let i = 0; i < col.codes.length; i++) view.setInt32(4 * i, col.codes[i], true);
      hash.update(buf);
    }
  }
  return hash.digestHex();
}

function littleEndianDoubles(values: Float64Array): Uint8Array {
  const buf = new Uint8Array(values.length * 8);
  const view = new DataView(buf.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat64(8 * i, Number.isNaN(values[i]) ? NaN : values[i], true);
  return buf;
}
