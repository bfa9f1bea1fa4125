/**
 * Creates the calculation-engine worker.
 *
 * Normal build and dev server: a module worker loaded from its own file next to the page.
 * Single-file build (`vite build --mode single`): the worker is bundled as a classic (iife) script and inlined
 * into the page, started from a blob: URL. It must be classic: Chromium refuses a module worker from a blob:
 * URL on a file:// page, and the Comlink calls then wait forever without an error.
 * In the normal build vite.config.ts resolves the `?worker&inline` import to an empty stub, so the engine is not
 * shipped twice.
 */
import InlineEngineWorker from '../worker/fulcra.worker.ts?worker&inline';

export function createEngineWorker(): Worker {
  return import.meta.env.MODE === 'single'
    ? new InlineEngineWorker({ name: 'fulcra-engine' })
    : new Worker(new URL('../worker/fulcra.worker.ts', import.meta.url), { type: 'module', name: 'fulcra-engine' });
}
