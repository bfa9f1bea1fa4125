import { describe, expect, it } from 'vitest';
import { createRng } from '../../src/engine/numerics/rng';

describe('createRng', () => {
  it('repeats its sequence for the same seed and differs for another', () => {
    const a = createRng(42),
      b = createRng(42),
      c = createRng(43);
    const sa = Array.from({ length: 5 }, () => a.next());
    expect(Array.from({ length: 5 }, () => b.next())).toEqual(sa);
    expect(Array.from({ length: 5 }, () => c.next())).not.toEqual(sa);
  });

  it('gives uniforms with mean 1/2 and normals with mean 0 and variance 1', () => {
    const r = createRng(7);
    let su = 0,
      sn = 0,
      sn2 = 0;
    const n = 200_000;
    for (let i = 0; i < n; i++) {
      const u = r.next();
      expect(u >= 0 && u < 1).toBe(true);
      su += u;
      const z = r.normal();
      sn += z;
      sn2 += z * z;
    }
    expect(su / n).toBeCloseTo(0.5, 2);
    expect(sn / n).toBeCloseTo(0, 1);
    expect(sn2 / n).toBeCloseTo(1, 1);
  });
});
