/**
 * Map from byte strings to integers (open addressing, FNV-1a hash), so repeated cell texts are recognised
 * without decoding them. Stops accepting new keys past `maxKeys` (`set` then returns false).
 */
export class ByteDict {
  private table = new Int32Array(1024).fill(-1);
  private pool = new Uint8Array(4096);
  private poolUsed = 0;
  private keyStart: number[] = [];
  private keyLength: number[] = [];
  private values: number[] = [];

  constructor(private readonly maxKeys = 50_000) {}

  get size(): number {
    return this.values.length;
  }

  private static hash(b: Uint8Array, s: number, e: number): number {
    let h = 0x811c9dc5;
    for (let i = s; i < e; i++) h = Math.imul(h ^ b[i], 0x01000193);
    return h >>> 0;
  }

  private find(b: Uint8Array, s: number, e: number, h: number): number {
    const mask = this.table.length - 1,
      len = e - s,
      pool = this.pool;
    for (let slot = h & mask; ; slot = (slot + 1) & mask) {
      const k = this.table[slot];
      if (k < 0) return -1 - slot;
      if (this.keyLength[k] !== len) continue;
      const p = this.keyStart[k];
      let i = 0;
      while (i < len && pool[p + i] === b[s + i]) i++;
      if (i === len) return k;
    }
  }

  /** The value stored for bytes[s, e), or undefined. */
  get(b: Uint8Array, s: number, e: number): number | undefined {
    const k = this.find(b, s, e, ByteDict.hash(b, s, e));
    return k >= 0 ? this.values[k] : undefined;
  }

  set(b: Uint8Array, s: number, e: number, value: number): boolean {
    if (this.values.length >= this.maxKeys) return false;
    if (2 * (this.values.length + 1) > this.table.length) this.grow();
    const h = ByteDict.hash(b, s, e);
    const k = this.find(b, s, e, h);
    if (k >= 0) {
      this.values[k] = value;
      return true;
    }
    const len = e - s;
    if (this.poolUsed + len > this.pool.length) {
      const p = new Uint8Array(Math.max(2 * this.pool.length, this.poolUsed + len));
      p.set(this.pool);
      this.pool = p;
    }
    this.pool.set(b.subarray(s, e), this.poolUsed);
    this.keyStart.push(this.poolUsed);
    this.keyLength.push(len);
    this.values.push(value);
    this.poolUsed += len;
    this.table[-1 - k] = this.values.length - 1;
    return true;
  }

  private grow(): void {
    const old = this.table;
    this.table = new Int32Array(old.length * 2).fill(-1);
    const mask = this.table.length - 1;
    for (let k = 0; k < this.values.length; k++) {
      const p = this.keyStart[k];
      let slot = ByteDict.hash(this.pool, p, p + this.keyLength[k]) & mask;
      while (this.table[slot] >= 0) slot = (slot + 1) & mask;
      this.table[slot] = k;
    }
  }
}
