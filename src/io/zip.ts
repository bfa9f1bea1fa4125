import { FulcraError } from '../engine/core';

export interface ZipEntry {
  name: string;
  method: number;
  compressedSize: number;
  /** The unpacked size the archive declares for this entry (checked while inflating: never more is produced). */
  uncompressedSize: number;
  offset: number;
}

const EOCD = 0x06054b50,
  CENTRAL = 0x02014b50,
  LOCAL = 0x04034b50;

/** True when the bytes start like a zip archive (an .xlsx is one). */
export function looksLikeZip(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && b[2] === 0x03 && b[3] === 0x04;
}

/** True for the old binary Excel (.xls) / OLE compound file signature. */
export function looksLikeOle(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0xd0 && b[1] === 0xcf && b[2] === 0x11 && b[3] === 0xe0;
}

/** Lists a zip archive's entries from its central directory (PKWARE APPNOTE 6.3, sections 4.3.12–4.3.16). */
export function listZip(b: Uint8Array): ZipEntry[] {
  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  let eocd = -1;
  for (let i = b.length - 22; i >= Math.max(0, b.length - 22 - 65_535); i--) {
    if (view.getUint32(i, true) === EOCD) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0)
    throw new FulcraError(
      'bad-zip',
      'The workbook is damaged: its table of contents is missing (the file may be cut short).',
    );
  const count = view.getUint16(eocd + 10, true);
  let p = view.getUint32(eocd + 16, true);
  const out: ZipEntry[] = [];
  const dec = new TextDecoder();
  for (let k = 0; k < count; k++) {
    if (p + 46 > b.length || view.getUint32(p, true) !== CENTRAL)
      throw new FulcraError('bad-zip', 'The workbook is damaged: its table of contents is unreadable.');
    const nameLen = view.getUint16(p + 28, true),
      extra = view.getUint16(p + 30, true),
      comment = view.getUint16(p + 32, true);
    out.push({
      name: dec.decode(b.subarray(p + 46, p + 46 + nameLen)),
      method: view.getUint16(p + 10, true),
      compressedSize: view.getUint32(p + 20, true),
      uncompressedSize: view.getUint32(p + 24, true),
      offset: view.getUint32(p + 42, true),
    });
    p += 46 + nameLen + extra + comment;
  }
  return out;
}

/** The uncompressed bytes of one entry (stored or deflated; deflate via DecompressionStream). */
export async function readZipEntry(b: Uint8Array, e: ZipEntry): Promise<Uint8Array> {
  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  if (e.offset + 30 > b.length || view.getUint32(e.offset, true) !== LOCAL) {
    throw new FulcraError('bad-zip', `The workbook is damaged: part "${e.name}" cannot be found.`);
  }
  const start = e.offset + 30 + view.getUint16(e.offset + 26, true) + view.getUint16(e.offset + 28, true);
  const data = b.slice(start, start + e.compressedSize);
  if (e.method === 0) return data;
  if (e.method !== 8)
    throw new FulcraError('bad-zip', `The workbook part "${e.name}" uses a compression this program cannot read.`);
  const stream = new Blob([data]).stream().pipeThrough(new DecompressionStream('deflate-raw'));
  const reader = stream.getReader();
  const out = new Uint8Array(e.uncompressedSize);
  let got = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      if (got + value.length > out.length) {
        void reader.cancel().catch(() => undefined);
        throw new FulcraError(
          'bad-zip',
          `The workbook is damaged or hostile: part "${e.name}" unpacks to more than the ` +
            `${e.uncompressedSize.toLocaleString('en-US')} bytes it declares, so it was not read further.`,
          'Open it in the spreadsheet and save it again, or save the sheet as CSV.',
        );
      }
      out.set(value, got);
      got += value.length;
    }
  } catch (err) {
    if (err instanceof FulcraError) throw err;
    throw new FulcraError(
      'bad-zip',
      `The workbook is damaged: part "${e.name}" cannot be unpacked.`,
      'Open it in the spreadsheet and save it again.',
    );
  }
  return got === out.length ? out : out.subarray(0, got);
}

/** The text of a named entry, or null if the archive has no such entry. */
export async function readZipText(b: Uint8Array, entries: ZipEntry[], name: string): Promise<string | null> {
  const e = entries.find((x) => x.name === name);
  return e ? new TextDecoder().decode(await readZipEntry(b, e)) : null;
}
