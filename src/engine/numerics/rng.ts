/**
 * Seeded pseudo-random numbers for everything that resamples (demo data, folds, bootstrap, imputation).
 * xoshiro128** (Blackman & Vigna 2018) seeded through splitmix32; state is four 32-bit words so a
 * generator can be cloned or sent to a worker as plain numbers.
 */
export interface Rng {
  /** Uniform on [0, 1). */
  next(): number;
  /** Integer uniform on [0, n). */
  int(n: number): number;
  /** Standard normal (Box–Muller, one value per call). */
  normal(): number;
  state(): [number, number, number, number];
}

export function createRng(seed: number): Rng {
  let x = seed >>> 0;
  const split = () => {
    x = (x + 0x9e3779b9) >>> 0;
    let z = x;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
  return fromState([split(), split(), split(), split()]);
}

export function fromState(init: [number, number, number, number]): Rng {
  let [a, b, c, d] = init;
  if ((a | b | c | d) === 0) a = 1;
  const nextU32 = () => {
    const result = Math.imul(rotl(Math.imul(b, 5) >>> 0, 7), 9) >>> 0;
    const t = (b << 9) >>> 0;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return result;
  };
  const next = () => (nextU32() * 2 ** 21 + (nextU32() >>> 11)) / 2 ** 53;
  return {
    next,
    int: (n) => Math.floor(next() * n),
    normal: () => {
      let u = next();
      while (u === 0) u = next();
      return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * next());
    },
    state: () => [a >>> 0, b >>> 0, c >>> 0, d >>> 0],
  };
}

function rotl(v: number, k: number): number {
  return ((v << k) | (v >>> (32 - k))) >>> 0;
}
