/**
 * A row pool over Node worker_threads for the headless command and the benchmark (the page's pool is
 * src/worker/rowPoolBrowser.ts). Helpers are started before any timing and take messages: see messagePool.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { messagePool, type RowPool } from '../engine/numerics';
import { messagePartReaders, type PartReaders } from '../io/parallelParse';

export interface NodeRowPool {
  pool: RowPool;
  /** The same helpers reading parts of a large delimited file (src/io/parallelParse.ts). */
  partReaders: PartReaders;
  close(): Promise<void>;
}

/** Threads a pool uses by default: the machine's cores, at most 8. */
export const defaultThreads = (): number => Math.max(1, Math.min(8, availableParallelism()));

/** Starts threads − 1 helpers; resolves when each is ready. The helpers do not keep the process alive. */
export async function startNodeRowPool(threads = defaultThreads()): Promise<NodeRowPool> {
  // From the build (.ci/cli.mjs) the helper is plain JavaScript beside this module; from the sources, TypeScript.
  const built = !import.meta.url.endsWith('.ts');
  const entry = fileURLToPath(new URL(built ? './rowHelperNode.js' : './rowHelperNode.ts', import.meta.url));
  const workers = await Promise.all(
    Array.from(
      { length: Math.max(0, threads - 1) },
      () =>
        new Promise<Worker>((resolve, reject) => {
          // The .ts entry goes through tsx's CommonJS hook: tsx's --import hooks do not reach workers in Node 20.
          const w = built
            ? new Worker(entry, { execArgv: [] })
            : new Worker(`require('tsx/cjs/api').register(); require(${JSON.stringify(entry)});`, {
                eval: true,
                execArgv: [],
              });
          w.once('message', () => {
            w.unref();
            resolve(w);
          });
          w.once('error', reject);
        }),
    ),
  );
  return {
    pool: messagePool(workers),
    partReaders: messagePartReaders(
      workers.map((w) => ({
        postMessage: (m, transfer) => w.postMessage(m, transfer),
        onReply: (f) => w.on('message', f),
        busy: (on) => (on ? w.ref() : w.unref()),
        onFailure: (f) => {
          w.on('error', f);
          w.on('exit', f);
        },
      })),
    ),
    close: async () => {
      await Promise.all(workers.map((w) => w.terminate()));
    },
  };
}
