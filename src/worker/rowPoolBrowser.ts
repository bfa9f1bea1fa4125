/**
 * The engine worker's row pool: helper Web Workers started from the engine worker, sharing the design through
 * SharedArrayBuffer. That needs a cross-origin-isolated page (Cross-Origin-Opener-Policy: same-origin and
 * Cross-Origin-Embedder-Policy: require-corp, sent by `vite preview` and the dev server; a hosted copy must send
 * them too). Without isolation, and in the single file (file:// is never isolated), the engine runs on this one
 * thread, with the same numbers. The single-file build replaces this module by a stub (vite.config.ts).
 */
import { installRowPool, messagePool } from '../engine/numerics';
import { installPartReaders, messagePartReaders } from '../io/parallelParse';

/** Threads at most (helpers + the engine worker). */
const MAX_THREADS = 8;
/** Helpers not ready by then are given up (the engine then runs on one thread). */
const START_TIMEOUT_MS = 10_000;

/** Starts the pool when the page allows it; resolves to the number of threads the engine's row passes use. */
export async function startBrowserRowPool(): Promise<number> {
  const g = self as unknown as { crossOriginIsolated?: boolean; navigator?: { hardwareConcurrency?: number } };
  const threads = Math.min(MAX_THREADS, g.navigator?.hardwareConcurrency ?? 1);
  if (!g.crossOriginIsolated || typeof SharedArrayBuffer === 'undefined' || threads < 2) return 1;
  const started: Worker[] = [];
  try {
    const ready = Promise.all(
      Array.from(
        { length: threads - 1 },
        (_, i) =>
          new Promise<Worker>((resolve, reject) => {
            const w = new Worker(new URL('./rowHelper.ts', import.meta.url), {
              type: 'module',
              name: `fulcra-rows-${i + 1}`,
            });
            started.push(w);
            w.onmessage = () => {
              w.onmessage = null;
              resolve(w);
            };
            w.onerror = (e) => {
              e.preventDefault();
              reject(new Error(e.message || 'a helper worker failed to start'));
            };
          }),
      ),
    );
    // Every call to the engine waits for this start: a helper that never answers must not hold the page up.
    let timer: ReturnType<typeof setTimeout> | undefined;
    const late = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error('helper start timed out')), START_TIMEOUT_MS);
    });
    const helpers = await Promise.race([ready, late]).finally(() => clearTimeout(timer));
    installRowPool(messagePool(helpers));
    // the same helpers read the parts of a large delimited file
    installPartReaders(
      messagePartReaders(
        helpers.map((w) => ({
          postMessage: (m, transfer) => w.postMessage(m, transfer),
          onReply: (f) => w.addEventListener('message', (e) => f(e.data)),
          onFailure: (f) => w.addEventListener('error', f),
        })),
      ),
    );
    // A helper that dies (out of memory, say) ends the pool: the pass it was in fails with a message, and every
    // later fit runs on the engine worker's own thread.
    for (const w of helpers) {
      w.onerror = (e) => {
        e.preventDefault();
        installRowPool(null);
        installPartReaders(null);
        for (const h of helpers) h.terminate();
      };
    }
    return threads;
  } catch {
    for (const w of started) w.terminate();
    return 1; // no helpers: one thread, same results
  }
}
