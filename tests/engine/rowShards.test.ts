import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { fit, fitAsync } from '../../src/engine/fitting/fit';
import { createRng } from '../../src/engine/numerics/rng';
import { CHUNK_ROWS, POOL_MIN_ROWS } from '../../src/engine/numerics/rowPool';
import { messageShards, shardHelper, type ShardPort } from '../../src/engine/numerics/rowShards';

/**
 * Helpers reached only by messages, as Web Workers without shared memory are: every message is copied
 * (structuredClone) and delivered later (setTimeout), so the caller really waits for each pass.
 */
function messagePorts(helpers: number, log: string[]): ShardPort[] {
  return Array.from({ length: helpers }, (_, i) => {
    let onReply: (data: unknown) => void = () => {};
    const onHelper = shardHelper((reply) => setTimeout(() => onReply(structuredClone(reply)), 0));
    return {
      postMessage: (m) => {
        log.push(`${i + 1}:${(m as { type: string }).type}`);
        setTimeout(() => onHelper(structuredClone(m)), 0);
      },
      listen: (f) => (onReply = f),
    };
  });
}

/** 45 000 rows (6 chunks): three numeric predictors (one missing every 499 rows) and a 3-level factor. */
function data(): { d: Dataset; spec: ModelSpec } {
  const N = POOL_MIN_ROWS + CHUNK_ROWS + 4_000,
    rng = createRng(17);
  const cols = ['a', 'b', 'c'].map((name) => ({
    kind: 'numeric' as const,
    name,
    // centres and scales far from 0 and 1, as in real data: the intercept's profile shifts these columns in place
    values: Float64Array.from({ length: N }, (_, i) =>
      name === 'b' && i % 499 === 7 ? NaN : name === 'a' ? 1000 + 3 * rng.normal() : 40 + 10 * rng.normal(),
    ),
  }));
  const g = {
    kind: 'categorical' as const,
    name: 'g',
    levels: ['u', 'v', 'w'],
    codes: Int32Array.from({ length: N }, (_, i) => (i * 7) % 3),
  };
  const y = Float64Array.from({ length: N }, (_, i) => {
    const eta = -1 + 0.5 * (cols[0].values[i] - 1000) + 0.02 * (cols[2].values[i] - 40) + 0.4 * g.codes[i];
    return rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  });
  return {
    d: { nRows: N, columns: [...cols, g, { kind: 'numeric', name: 'y', values: y }] },
    spec: { outcome: 'y', event: '1', terms: ['a', 'b', 'c', 'g'].map((column) => ({ type: 'main', column })) },
  };
}

describe('row shards: profile limits and term tests over helpers that share no memory', () => {
  const { d, spec } = data();
  const alone = fit(d, spec);

  it.each([1, 2, 4])('give bit for bit the fit of one thread with %i helper(s)', async (helpers) => {
    const log: string[] = [];
    const shards = messageShards(messagePorts(helpers, log));
    const shared = await fitAsync(d, spec, {}, undefined, shards);
    expect(JSON.stringify(shared)).toBe(JSON.stringify(alone));
    // each helper got the rows once and then only passes
    for (let h = 1; h <= helpers; h++) {
      const mine = log.filter((l) => l.startsWith(`${h}:`));
      expect(mine[0]).toBe(`${h}:load`);
      expect(mine.filter((l) => l.endsWith(':load'))).toHaveLength(1);
      expect(mine.at(-1)).toBe(`${h}:drop`); // the rows are let go when the fit ends
      expect(mine.filter((l) => l.endsWith(':add'))).toHaveLength(2); // the intercept's shift there and back
      expect(mine.length).toBeGreaterThan(5); // rounds of up to four solves (10 limits, 4 term tests)
    }
    expect(alone.coefficients.every((c) => c.profileLower !== null && c.profileUpper !== null)).toBe(true);
    expect(alone.terms.every((t) => t.lrChi2 !== null)).toBe(true);
  });

  it('serve one fit at a time: a second fit started meanwhile runs on this thread; both as one thread', async () => {
    const log: string[] = [];
    const shards = messageShards(messagePorts(2, log));
    const [first, second] = await Promise.all([
      fitAsync(d, spec, {}, undefined, shards),
      fitAsync(d, spec, {}, undefined, shards),
    ]);
    expect(JSON.stringify(first)).toBe(JSON.stringify(alone));
    expect(JSON.stringify(second)).toBe(JSON.stringify(alone));
    expect(log.filter((l) => l.endsWith(':load'))).toHaveLength(2); // one per helper, for one of the two fits
  });

  it('leave data below POOL_MIN_ROWS rows on this thread', async () => {
    const log: string[] = [];
    const shards = messageShards(messagePorts(2, log));
    const small: Dataset = {
      nRows: 500,
      columns: d.columns.map((c) =>
        c.kind === 'numeric' ? { ...c, values: c.values.slice(0, 500) } : { ...c, codes: c.codes.slice(0, 500) },
      ),
    };
    expect(JSON.stringify(await fitAsync(small, spec, {}, undefined, shards))).toBe(JSON.stringify(fit(small, spec)));
    expect(log).toEqual([]);
  });

  it('say which pass failed when a helper cannot answer', async () => {
    const ports = messagePorts(1, []);
    const broken: ShardPort = {
      listen: (f) => ports[0].listen(f),
      // the rows never reach the helper
      postMessage: (m, t) => ((m as { type: string }).type === 'load' ? undefined : ports[0].postMessage(m, t)),
    };
    await expect(fitAsync(d, spec, {}, undefined, messageShards([broken]))).rejects.toThrow(
      /helper thread failed .*never sent/,
    );
  });
});
