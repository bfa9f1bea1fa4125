/**
 * What every part of the controller shares: the store, the worker client, and a runner that shows a job with
 * its progress while a worker call runs.
 */
import type { WorkerClient } from '../../bridge/workerClient';
import * as A from '../actions';
import type { AppState } from '../appState';
import type { Store } from '../store';

export interface EffectContext {
  store: Store;
  client: WorkerClient;
  /** The store's state now. */
  s(): AppState;
  /** Jobs that only stopping the engine can cancel (a fit that runs without yielding); see cancelByRestart. */
  stopsEngine: Set<string>;
  /** Runs `run` as a job named `label` in the job bar (with its progress, and a Cancel button if `cancellable`). */
  job<T>(
    label: string,
    cancellable: boolean,
    run: (jobId: string, onProgress: (done: number, total: number) => void) => Promise<T | undefined>,
  ): Promise<T | undefined>;
}

let counter = 0;
/** A number no other job or load of this page has. */
export const nextSerial = (): number => ++counter;

export function effectContext(store: Store, client: WorkerClient): EffectContext {
  return {
    store,
    client,
    s: () => store.get(),
    stopsEngine: new Set(),
    async job(label, cancellable, run) {
      const id = `${label.split(' ')[0].toLowerCase()}-${nextSerial()}`;
      store.apply(A.jobStarted, { id, label, done: 0, total: 0, cancellable });
      const onProgress = client.progress((done: number, total: number) =>
        store.apply(A.jobProgress, { id, done, total }),
      );
      try {
        return await run(id, onProgress);
      } finally {
        store.apply(A.jobEnded, id);
      }
    },
  };
}
