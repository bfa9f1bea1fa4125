const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const LOOKUP = new Int16Array(128).fill(-1);
for (let i = 0; i < ALPHABET.length; i++) LOOKUP[ALPHABET.charCodeAt(i)] = i;

/** Standard base64 (RFC 4648 §4, with padding) of bytes; pure, for Node, worker and page. */
export function bytesToBase64(bytes: Uint8Array): string {
  const parts: string[] = [];
  let chunk = '';
  let i = 0;
  for (; i + 2 < bytes.length; i += 3) {
    const n = (bytes[i] << 16) | (bytes[i + 1] << 8) | bytes[i + 2];
    chunk += ALPHABET[n >>> 18] + ALPHABET[(n >>> 12) & 63] + ALPHABET[(n >>> 6) & 63] + ALPHABET[n & 63];
    if (chunk.length >= 8192) {
      parts.push(chunk);
      chunk = '';
    }
  }
  const rest = bytes.length - i;
  if (rest === 1) {
    const n = bytes[i] << 16;
    chunk += ALPHABET[n >>> 18] + ALPHABET[(n >>> 12) & 63] + '==';
  } else if (rest === 2) {
    const n = (bytes[i] << 16) | (bytes[i + 1] << 8);
    chunk += ALPHABET[n >>> 18] + ALPHABET[(n >>> 12) & 63] + ALPHABET[(n >>> 6) & 63] + '=';
  }
  parts.push(chunk);
  return parts.join('');
}

/** Decodes standard base64; returns null when the text is not valid base64. */
export function base64ToBytes(text: string): Uint8Array | null {
  const s = text.replace(/=+$/, '');
  if (s.length % 4 === 1) return null;
  const out = new Uint8Array(Math.floor((s.length * 3) / 4));
  let o = 0;
  for (let i = 0; i < s.length; i += 4) {
    let n = 0;
    const m = Math.min(4, s.length - i);
    for (let j = 0; j < 4; j++) {
      const c = j < m ? s.charCodeAt(i + j) : 65;
      const v = c < 128 ? LOOKUP[c] : -1;
      if (v < 0) return null;
      n = (n << 6) | (j < m ? v : 0);
    }
    out[o++] = (n >>> 16) & 255;
    if (m > 2) out[o++] = (n >>> 8) & 255;
    if (m > 3) out[o++] = n & 255;
  }
  return out;
}
