const QUOTE = 34,
  LF = 10,
  CR = 13;

import type { TokenizerIssue } from './csvTokenizer';

/**
 * One record as byte spans into `bytes`: field k is bytes[starts[k], ends[k]) unless `strs[k]` holds its
 * decoded text (quoted fields with doubled quotes or text after the closing quote).
 */
export interface ByteRecord {
  bytes: Uint8Array;
  count: number;
  starts: Int32Array;
  ends: Int32Array;
  strs: (string | null)[];
}

/**
 * The delimited-text tokenizer of `CsvTokenizer`, working on the undecoded bytes of an ASCII-compatible
 * encoding (UTF-8, Windows-1252): delimiters, quotes and line ends are single bytes that never occur inside
 * a multi-byte UTF-8 character, so cells are decoded only when needed. The whole file is in memory, so a
 * record is never split: `step(limit)` reads the records that start before `limit`.
 */
export class ByteTokenizer {
  records = 0;
  lineEnds = { lf: 0, crlf: 0, cr: 0 };
  issues: TokenizerIssue[] = [];
  pos: number;
  private readonly rec: ByteRecord;
  private readonly delim: number;

  constructor(
    private readonly bytes: Uint8Array,
    start: number,
    delimiter: string,
    private readonly decode: (b: Uint8Array) => string,
    private readonly onRecord: (r: ByteRecord) => void,
  ) {
    this.pos = start;
    this.delim = delimiter.charCodeAt(0);
    this.rec = { bytes, count: 0, starts: new Int32Array(64), ends: new Int32Array(64), strs: [] };
  }

  get done(): boolean {
    return this.pos >= this.bytes.length;
  }

  private put(count: number, start: number, end: number, str: string | null): void {
    const r = this.rec;
    if (count === r.starts.length) {
      const s = new Int32Array(count * 2),
        e = new Int32Array(count * 2);
      s.set(r.starts);
      e.set(r.ends);
      r.starts = s;
      r.ends = e;
    }
    r.starts[count] = start;
    r.ends[count] = end;
    r.strs[count] = str;
  }

  step(limit: number): void {
    const b = this.bytes,
      n = b.length,
      d = this.delim,
      rec = this.rec;
    let recStart = this.pos;
    while (recStart < n && recStart < limit) {
      let j = recStart,
        count = 0;
      for (;;) {
        if (j < n && b[j] === QUOTE) {
          let k = j + 1,
            seg = k,
            parts: string | null = null;
          let start = k,
            end: number;
          for (;;) {
            const q = b.indexOf(QUOTE, k);
            if (q < 0) {
              this.issues.push({ kind: 'unclosed-quote', record: this.records, field: count });
              end = n;
              j = n;
              break;
            }
            if (q + 1 < n && b[q + 1] === QUOTE) {
              parts = (parts ?? '') + this.decode(b.subarray(seg, q + 1));
              k = seg = q + 2;
              continue;
            }
            end = q;
            j = q + 1;
            break;
          }
          if (parts !== null) parts += this.decode(b.subarray(seg, end));
          if (j < n) {
            let c = b[j];
            if (c !== d && c !== LF && c !== CR) {
              let e = j;
              while (e < n && c !== d && c !== LF && c !== CR) c = b[++e];
              this.issues.push({ kind: 'stray-quote', record: this.records, field: count });
              parts = (parts ?? this.decode(b.subarray(start, end))) + this.decode(b.subarray(j, e));
              j = e;
            }
          }
          if (parts !== null) start = end = -1;
          this.put(count++, start, end, parts);
        } else {
          let e = j;
          while (e < n) {
            const c = b[e];
            if (c === d || c === LF || c === CR) break;
            e++;
          }
          this.put(count++, j, e, null);
          j = e;
        }
        if (j >= n) break;
        const c = b[j];
        if (c === d) {
          j++;
          if (j >= n) {
            this.put(count++, j, j, null);
            break;
          }
          continue;
        }
        if (c === CR) {
          if (j + 1 < n && b[j + 1] === LF) {
            this.lineEnds.crlf++;
            j += 2;
          } else {
            this.lineEnds.cr++;
            j++;
          }
        } else {
          this.lineEnds.lf++;
          j++;
        }
        break;
      }
      rec.count = count;
      this.onRecord(rec);
      this.records++;
      recStart = j;
    }
    this.pos = recStart;
  }
}

/** The record's fields as strings. */
export function byteRecordStrings(r: ByteRecord, decode: (b: Uint8Array) => string): string[] {
  return Array.from({ length: r.count }, (_, k) => r.strs[k] ?? decode(r.bytes.subarray(r.starts[k], r.ends[k])));
}
