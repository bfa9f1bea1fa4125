/**
 * Creates the calculation-engine worker, and its shard helpers (the same script under another name).
 *
 * Normal build and dev server: a module worker loaded from its own file next to the page.
 * Single-file build (`vite build --mode single`): the worker is bundled as a classic (iife) script and inlined
 * into the page, started from a blob: URL. It must be classic: Chromium refuses a module worker from a blob:
 * URL on a file:// page, and the Comlink calls then wait forever without an error.
 * In the normal build vite.config.ts resolves the `?worker&inline` import to an empty stub, so the engine is not
 * shipped twice.
 */
import InlineEngineWorker from '../worker/fulcra.worker.ts?worker&inline';

export function createEngineWorker(name = 'fulcra-engine'): Worker {
  return import.meta.env.MODE === 'single'
    ? new InlineEngineWorker({ name })
    : new Worker(new URL('../worker/fulcra.worker.ts', import.meta.url), { type: 'module', name });
}

/** Threads at most (the engine worker and its helpers). */
const MAX_THREADS = 8;

/**
 * Threads the engine's profile limits and term tests may use through shard helpers: 1 in a cross-origin-isolated
 * page (the engine worker starts its own shared-memory row pool there), else the computer's cores, at most
 * MAX_THREADS; `?threads=N` in the page's address sets N (1: none).
 */
export function shardThreads(): number {
  if (self.crossOriginIsolated) return 1;
  const asked = Number(new URLSearchParams(self.location?.search ?? '').get('threads') ?? NaN);
  const n = Number.isInteger(asked) && asked >= 1 ? asked : (self.navigator?.hardwareConcurrency ?? 1);
  return Math.max(1, Math.min(MAX_THREADS, n));
}

/**
 * Starts threads − 1 shard helpers and connects each to the engine by a MessageChannel: returns the helpers and
 * the engine's ends of the channels (for the api's attachShards).
 */
export function startShardHelpers(threads: number): { helpers: Worker[]; ports: MessagePort[] } {
  const helpers: Worker[] = [],
    ports: MessagePort[] = [];
  for (let i = 1; i < threads; i++) {
    const helper = createEngineWorker(`fulcra-shard-${i}`);
    const channel = new MessageChannel();
    helper.postMessage({ port: channel.port2 }, [channel.port2]);
    helpers.push(helper);
    ports.push(channel.port1);
  }
  return { helpers, ports };
}
