const QUOTE = 34,
  LF = 10,
  CR = 13;

export interface TokenizerIssue {
  kind: 'unclosed-quote' | 'stray-quote';
  /** 0-based record index where it happened. */
  record: number;
  field: number;
}

/**
 * One record as spans into `text` (valid only during the callback): field k is `text.slice(starts[k], ends[k])`
 * unless `strs[k]` holds it (quoted fields with doubled quotes or text after the closing quote).
 * Spans avoid creating a string per cell, so numbers are read straight from the text.
 */
export interface RecordSpans {
  text: string;
  count: number;
  starts: Int32Array;
  ends: Int32Array;
  strs: (string | null)[];
}

export function fieldText(r: RecordSpans, k: number): string {
  return r.strs[k] ?? r.text.slice(r.starts[k], r.ends[k]);
}

/** The record's fields as strings (for detection and the rare second pass). */
export function recordStrings(r: RecordSpans): string[] {
  return Array.from({ length: r.count }, (_, k) => fieldText(r, k));
}

/**
 * Delimited-text tokenizer (RFC 4180 quoting: "" inside quotes is a quote; quoted fields may hold the
 * delimiter and newlines). Accepts LF, CRLF and CR line ends, mixed. Text is fed in chunks; a record split
 * across chunks is carried to the next chunk. Calls `onRecord` for every record, including blank ones
 * (one empty field), with a reused `RecordSpans`.
 */
export class CsvTokenizer {
  records = 0;
  lineEnds = { lf: 0, crlf: 0, cr: 0 };
  issues: TokenizerIssue[] = [];
  private carry = '';
  private readonly rec: RecordSpans = {
    text: '',
    count: 0,
    starts: new Int32Array(64),
    ends: new Int32Array(64),
    strs: [],
  };
  private readonly delim: number;

  constructor(
    delimiter: string,
    private readonly onRecord: (r: RecordSpans) => void,
  ) {
    this.delim = delimiter.charCodeAt(0);
  }

  feed(chunk: string, final: boolean): void {
    // join() gives a flat string; `carry + chunk` would give a cons string, several times slower to scan.
    const text = this.carry.length > 0 ? [this.carry, chunk].join('') : chunk;
    const used = this.scan(text, final);
    this.carry = used < text.length ? text.slice(used) : '';
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

  /** Returns the index of the first character not yet consumed (start of an incomplete record). */
  private scan(text: string, final: boolean): number {
    const n = text.length,
      d = this.delim,
      rec = this.rec;
    rec.text = text;
    let recStart = 0;
    while (recStart < n) {
      let j = recStart,
        count = 0;
      for (;;) {
        if (j >= n && !final) return recStart;
        if (j < n && text.charCodeAt(j) === QUOTE) {
          let k = j + 1,
            seg = k,
            parts: string | null = null;
          let start = k,
            end: number;
          for (;;) {
            const q = text.indexOf('"', k);
            if (q < 0) {
              if (!final) return recStart;
              this.issues.push({ kind: 'unclosed-quote', record: this.records, field: count });
              end = n;
              j = n;
              break;
            }
            if (q + 1 >= n && !final) return recStart;
            if (q + 1 < n && text.charCodeAt(q + 1) === QUOTE) {
              parts = (parts ?? '') + text.slice(seg, q + 1);
              k = seg = q + 2;
              continue;
            }
            end = q;
            j = q + 1;
            break;
          }
          if (parts !== null) parts += text.slice(seg, end);
          if (j < n) {
            let c = text.charCodeAt(j);
            if (c !== d && c !== LF && c !== CR) {
              let e = j;
              while (e < n && c !== d && c !== LF && c !== CR) c = text.charCodeAt(++e);
              if (e >= n && !final) return recStart;
              this.issues.push({ kind: 'stray-quote', record: this.records, field: count });
              parts = (parts ?? text.slice(start, end)) + text.slice(j, e);
              j = e;
            }
          }
          if (parts !== null) start = end = -1;
          this.put(count++, start, end, parts);
        } else {
          let e = j;
          while (e < n) {
            const c = text.charCodeAt(e);
            if (c === d || c === LF || c === CR) break;
            e++;
          }
          if (e >= n && !final) return recStart;
          this.put(count++, j, e, null);
          j = e;
        }
        if (j >= n) break;
        const c = text.charCodeAt(j);
        if (c === d) {
          j++;
          if (j >= n && final) {
            this.put(count++, j, j, null);
            break;
          }
          continue;
        }
        if (c === CR) {
          if (j + 1 >= n && !final) return recStart;
          if (j + 1 < n && text.charCodeAt(j + 1) === LF) {
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
    return recStart;
  }
}
