import { describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import * as A from '../../src/state/actions';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import { createApi } from '../../src/worker/api';

/**
 * The controller on the real api in-process, with a client that behaves as the page's WorkerClient: `restart()`
 * (and a crash) end the api, settle the calls waiting on it silently, and put a fresh, empty api in its place.
 */
function harness(options: { failFitsAfterRestart?: boolean } = {}) {
  let api = createApi();
  let lost: (e: unknown) => void = () => {};
  let lostPromise = new Promise<never>((_, r) => (lost = r));
  lostPromise.catch(() => {});
  const renew = (code: string) => {
    lost({ code });
    lostPromise = new Promise<never>((_, r) => (lost = r));
    lostPromise.catch(() => {});
    api = createApi();
    if (options.failFitsAfterRestart) {
      api.fitModel = async () => {
        throw { code: 'internal', message: 'A helper thread failed while summing its rows.' };
      };
    }
  };
  const store = createStore();
  const errors: string[] = [];
  const report = (e: unknown) => {
    const err = e as { code?: string; message?: string };
    if (err.code !== 'cancelled' && err.code !== 'worker-lost') {
      errors.push(err.message ?? String(e));
      store.apply(A.notify, { kind: 'error', text: err.message ?? String(e) });
    }
    return undefined;
  };
  const client: WorkerClient = {
    call: (run) => Promise.race([run(api as never), lostPromise]).catch(report),
    latest: (_key, run) => Promise.race([run(api as never), lostPromise]).catch(report),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: (id) => void api.cancel(id),
    restart: () => renew('cancelled'),
    terminate: () => {},
  };
  const ctl = createController(store, client);
  const crash = async () => {
    renew('worker-lost');
    await ctl.recover('The calculation engine stopped unexpectedly and was restarted.');
  };
  return { store, ctl, errors, crash, api: () => api };
}

const estimates = (s: ReturnType<typeof createStore>) => s.get().fit?.fit.coefficients.map((c) => c.estimate) ?? [];

describe('every fit shows progress and can be cancelled', () => {
  it('standard and Firth fits are cancellable jobs that report progress to the job bar', async () => {
    for (const method of ['ml', 'firth'] as const) {
      const h = harness();
      await h.ctl.startDemo('ssi');
      h.store.apply(A.chooseMethod, method);
      const seen: { done: number; total: number; cancellable: boolean }[] = [];
      const stop = h.store.subscribe(() => {
        const j = h.store.get().jobs.find((x) => x.label === 'Fitting the model');
        if (j) seen.push({ done: j.done, total: j.total, cancellable: j.cancellable });
      });
      await h.ctl.fitModel();
      stop();
      expect(seen.length, method).toBeGreaterThan(2);
      expect(
        seen.every((j) => j.cancellable),
        method,
      ).toBe(true);
      // One step for the fit, one per coefficient's profile limits, one per term test.
      const last = seen[seen.length - 1];
      expect(last.total, method).toBe(1 + 13 + 9);
      expect(last.done, method).toBe(last.total);
    }
  });

  it('Cancel stops the engine; the model shown before is refitted and the engine answers for it', async () => {
    const h = harness();
    await h.ctl.startDemo('ssi');
    const before = estimates(h.store);
    h.store.apply(A.chooseMethod, 'firth');
    const running = h.ctl.fitModel();
    const job = h.store.get().jobs.find((j) => j.label === 'Fitting the model')!;
    expect(job.cancellable).toBe(true);
    h.ctl.cancel(job.id);
    await running;
    while (!h.store.get().notices.some((n) => n.text.startsWith('The fit was cancelled')))
      await new Promise((r) => setTimeout(r, 20));
    const s = h.store.get();
    expect(h.errors).toEqual([]);
    expect(s.fit?.request.method).toBe('ml');
    expect(estimates(h.store)).toEqual(before);
    expect(s.notices.map((n) => n.text)).toContain(
      `The fit was cancelled: the engine was stopped and started afresh. Your data (${s.data!.source.name}) were ` +
        'loaded into it again and the model was restored; nothing was lost.',
    );
    // The fresh engine holds the data and the model: a cut-off query answers.
    h.store.apply(A.setThreshold, 0.3);
    await h.ctl.queryThreshold();
    expect(h.store.get().thresholdView?.metrics.threshold).toBe(0.3);
  });

  it('Cancel of the first fit leaves the data loaded and no model', async () => {
    const h = harness();
    await h.ctl.pasteText('age\tinfected\n50\tno\n61\tyes\n70\tyes\n45\tno\n52\tyes\n48\tno\n');
    await h.ctl.act(A.changeOutcome, { column: 'infected' });
    await h.ctl.act(A.changeRole, { column: 'age', role: { include: true } });
    const running = h.ctl.fitModel();
    h.ctl.cancel(h.store.get().jobs.find((j) => j.label === 'Fitting the model')!.id);
    await running;
    while (!h.store.get().notices.some((n) => n.text.startsWith('The fit was cancelled')))
      await new Promise((r) => setTimeout(r, 20));
    expect(h.store.get().fit).toBeNull();
    expect(h.store.get().data?.nRows).toBe(6);
    expect((await h.ctl.getRows(0, 1))?.cells[0]).toContain('50');
    expect(h.errors).toEqual([]);
  });
});

describe('after an engine crash the page is consistent', () => {
  it('when the model cannot be refitted, no view keeps its results and the notice says so', async () => {
    const h = harness({ failFitsAfterRestart: true });
    await h.ctl.startDemo('ssi');
    expect(h.store.get().thresholdView).not.toBeNull();
    await h.crash();
    const s = h.store.get();
    expect(s.data?.nRows).toBe(2000);
    expect([s.fit, s.thresholdView, s.costView, s.riskCurve, s.lossSurface]).toEqual([null, null, null, null, null]);
    expect(s.notices.some((n) => /the model was not refitted, so no model is shown/.test(n.text))).toBe(true);
    expect(s.notices.some((n) => /nothing was lost/.test(n.text))).toBe(false);
  });
});
