/**
 * Main-thread bridge to the engine worker: creates the worker, forwards calls through Comlink, keeps only the
 * latest of a stream of cheap queries (the threshold slider), reports every failure in one place, and restarts
 * the worker when it crashes. Cancellation ('cancelled') is silent.
 */
import * as Comlink from 'comlink';
import type { FulcraApi } from '../worker/api';
import { createEngineWorker, shardThreads, startShardHelpers } from './engineWorker';

export type Api = Comlink.Remote<FulcraApi>;

export interface WorkerClientHooks {
  /** Any failure other than a cancellation, already worded for the user. */
  onError(message: string, suggestion?: string): void;
  /** The worker died and was restarted empty. */
  onCrash(message: string): void;
}

export interface WorkerClient {
  call<T>(run: (api: Api) => Promise<T>): Promise<T | undefined>;
  /** Runs `run` unless a newer call with the same key arrives first; stale calls resolve to undefined. */
  latest<T>(key: string, run: (api: Api) => Promise<T>): Promise<T | undefined>;
  progress(fn: (done: number, total: number) => void): (done: number, total: number) => void;
  transfer<T>(value: T, buffers: Transferable[]): T;
  cancel(jobId: string): void;
  /**
   * Stops the engine now, whatever it is doing (a fit that does not yield cannot see a cancel message), and starts
   * a fresh, empty one; calls still waiting resolve to undefined, silently. The caller puts the data back.
   */
  restart(): void;
  terminate(): void;
}

export function createWorkerClient(hooks: WorkerClientHooks): WorkerClient {
  let worker: Worker;
  /** Shard helpers of the engine worker (pages without shared memory: engineWorker.ts). */
  let helpers: Worker[] = [];
  let api: Api;
  /** Settles every call still waiting on a worker that died. */
  let lost: (reason: unknown) => void = () => {};
  let lostPromise: Promise<never>;
  const armLost = () => {
    lostPromise = new Promise<never>((_, reject) => {
      lost = reject;
    });
    lostPromise.catch(() => {});
  };
  /** Ends the engine worker (its helper threads end with it) and settles every call waiting on it. */
  const stop = (code: string) => {
    worker.terminate();
    for (const h of helpers) h.terminate();
    helpers = [];
    lost({ code });
  };
  const start = () => {
    armLost();
    worker = createEngineWorker();
    worker.addEventListener('error', (e) => {
      e.preventDefault();
      stop('worker-lost');
      start();
      hooks.onCrash(
        `The calculation engine stopped unexpectedly${e.message ? ` (${e.message})` : ''} and was restarted.`,
      );
    });
    api = Comlink.wrap<FulcraApi>(worker);
    const threads = shardThreads();
    if (threads > 1) {
      const started = startShardHelpers(threads);
      helpers = started.helpers;
      // a helper that dies takes the engine down with it: both restart, as after an engine crash
      for (const h of helpers)
        h.addEventListener('error', (e) => {
          e.preventDefault();
          if (!helpers.includes(h)) return;
          stop('worker-lost');
          start();
          hooks.onCrash(`A helper thread of the calculation engine stopped unexpectedly; the engine was restarted.`);
        });
      api.attachShards(Comlink.transfer(started.ports, started.ports)).catch(() => {});
    }
  };
  start();
  const guard = <T>(p: Promise<T>): Promise<T> => Promise.race([p, lostPromise]);

  const report = (err: unknown): undefined => {
    const e = err as { code?: string; message?: string; suggestion?: string };
    if (e?.code === 'cancelled' || e?.code === 'worker-lost') return undefined;
    hooks.onError(e?.message ?? String(err), e?.suggestion);
    return undefined;
  };

  const pending = new Map<string, { run: (api: Api) => Promise<unknown>; resolve: (v: unknown) => void }>();
  const inFlight = new Set<string>();

  const pump = (key: string) => {
    const next = pending.get(key);
    if (!next || inFlight.has(key)) return;
    pending.delete(key);
    inFlight.add(key);
    guard(next.run(api))
      .then(next.resolve, (err) => next.resolve(report(err)))
      .finally(() => {
        inFlight.delete(key);
        pump(key);
      });
  };

  return {
    call: (run) => guard(run(api)).catch(report),
    latest<T>(key: string, run: (api: Api) => Promise<T>) {
      return new Promise<T | undefined>((resolve) => {
        pending.get(key)?.resolve(undefined);
        pending.set(key, { run, resolve: resolve as (v: unknown) => void });
        pump(key);
      });
    },
    progress: (fn) => Comlink.proxy(fn),
    transfer: (value, buffers) => Comlink.transfer(value, buffers),
    cancel: (jobId) => {
      void api.cancel(jobId);
    },
    restart: () => {
      stop('cancelled');
      start();
    },
    terminate: () => worker.terminate(),
  };
}
