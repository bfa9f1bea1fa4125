/** Checking and using the model: bootstrap validation, validation on a second file, scoring cases. */
import * as A from '../actions';
import type { EffectContext } from './context';

export interface CheckEffects {
  validate(replicates: number): Promise<void>;
  externalValidate(file: File): Promise<void>;
  scoreOne(values: Record<string, string | number | null>): Promise<void>;
  scoreBatch(file: File): Promise<void>;
}

export function checks({ store, client, s, job }: EffectContext): CheckEffects {
  return {
    /** Ends as done, cancelled, or (after an error, which the notice list shows) back to idle. */
    async validate(replicates) {
      store.apply(A.validationStarted, undefined);
      const firstNew = s().nextNoticeId;
      let cancelled = false;
      const view = await job(`Bootstrap validation (${replicates} resamples)`, true, (id, onProgress) =>
        client
          .call((api) => api.validate(replicates, id, onProgress))
          .then((v) => {
            if (v === undefined) cancelled = true;
            return v;
          }),
      );
      const failed = s().notices.some((n) => n.kind === 'error' && n.id >= firstNew);
      if (view) store.apply(A.validationDone, view);
      else if (failed) store.apply(A.validationFailed, undefined);
      else if (cancelled) store.apply(A.validationCancelled, undefined);
    },
    async externalValidate(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Validating on ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.externalValidate(client.transfer(bytes, [bytes]), file.name, id, onProgress)),
      );
      if (view) store.apply(A.externalDone, view);
    },
    async scoreOne(values) {
      const view = await client.call((api) => api.scoreOne(values, s().threshold));
      if (view) store.apply(A.scoreDone, view);
    },
    async scoreBatch(file) {
      const bytes = await file.arrayBuffer();
      const view = await job(`Scoring ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.scoreBatch(client.transfer(bytes, [bytes]), file.name, s().threshold, id, onProgress)),
      );
      if (view) store.apply(A.batchDone, view);
    },
  };
}
