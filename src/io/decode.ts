import type { Encoding } from './types';

/** Byte-order mark: the encoding it announces and its length; null when there is none. */
export function detectBom(bytes: Uint8Array): { encoding: Encoding; length: number } | null {
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf)
    return { encoding: 'utf-8', length: 3 };
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) return { encoding: 'utf-16le', length: 2 };
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) return { encoding: 'utf-16be', length: 2 };
  return null;
}

/** Byte offset of the first byte that does not start a well-formed UTF-8 sequence (lead/continuation check), or -1. */
export function firstInvalidUtf8(b: Uint8Array): number {
  let i = 0;
  while (i < b.length) {
    const c = b[i];
    if (c < 0x80) {
      i++;
      continue;
    }
    const need = c >= 0xc2 && c <= 0xdf ? 1 : c >= 0xe0 && c <= 0xef ? 2 : c >= 0xf0 && c <= 0xf4 ? 3 : -1;
    if (need < 0) return i;
    for (let k = 1; k <= need; k++) if (i + k >= b.length || (b[i + k] & 0xc0) !== 0x80) return i;
    i += need + 1;
  }
  return -1;
}

/** Bytes read per chunk: progress, cancellation and yielding happen between chunks. */
export const CHUNK_BYTES = 4 * 1024 * 1024;

/**
 * Decodes `bytes` chunk by chunk (a streaming TextDecoder, so characters split across chunks are kept).
 * With `fatal`, invalid bytes throw a TypeError instead of becoming U+FFFD.
 */
export function* decodeChunks(
  bytes: Uint8Array,
  encoding: Encoding,
  start: number,
  fatal: boolean,
): Generator<{ text: string; end: number; final: boolean }> {
  const dec = new TextDecoder(encoding, { fatal, ignoreBOM: true });
  for (let pos = start; pos < bytes.length || pos === start; pos += CHUNK_BYTES) {
    const end = Math.min(bytes.length, pos + CHUNK_BYTES);
    const final = end >= bytes.length;
    const text = dec.decode(bytes.subarray(pos, end), { stream: !final });
    yield { text, end, final };
    if (final) break;
  }
}
