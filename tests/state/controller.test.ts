import { describe, expect, it } from 'vitest';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import * as A from '../../src/state/actions';
import type { WorkerClient } from '../../src/bridge/workerClient';
import { createApi } from '../../src/worker/api';

/** The page's controller wired to the real worker api in-process (no Worker, no Comlink). */
function harness() {
  const api = createApi();
  const errors: string[] = [];
  const report = (e: unknown) => {
    const err = e as { code?: string; message?: string };
    if (err.code !== 'cancelled') errors.push(err.message ?? String(e));
    return undefined;
  };
  const client: WorkerClient = {
    call: (run) => run(api as never).catch(report),
    latest: (_key, run) => run(api as never).catch(report),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: (id) => {
      void api.cancel(id);
    },
    restart: () => {},
    terminate: () => {},
  };
  const store = createStore();
  return { store, ctl: createController(store, client), errors };
}

describe('controller with the worker api in-process', () => {
  it('one click on a demo loads it, fits it, and prepares the cut-off, risk curve and loss views', async () => {
    const { store, ctl, errors } = harness();
    await ctl.startDemo('ssi');
    const s = store.get();
    expect(errors).toEqual([]);
    expect(s.view).toBe('model');
    expect(s.fit?.fit.coefficients).toHaveLength(14);
    expect(s.costView?.optimal.decisionTheory.threshold).toBeCloseTo(1 / 11, 12);
    expect(s.threshold).toBeCloseTo(1 / 11, 12);
    expect(s.thresholdView?.metrics.threshold).toBe(s.threshold);
    expect(s.riskCurve?.predictor).toBe('age');
    expect(s.lossSurface?.names).toEqual(['age', 'bmi']);
    expect(s.jobs).toEqual([]);
  });

  it('moving the cut-off changes the confusion matrix; the counts always add up to the rows used', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('seals');
    const before = store.get().thresholdView!.metrics;
    store.apply(A.setThreshold, 0.3);
    await ctl.queryThreshold();
    const after = store.get().thresholdView!.metrics;
    expect(after.tp + after.fp).toBeLessThan(before.tp + before.fp);
    expect(after.tp + after.fp + after.tn + after.fn).toBe(store.get().fit!.fit.nUsed);
  });

  it('a fit that cannot start says why in the one notice list instead of calling the worker', async () => {
    const { store, ctl } = harness();
    await ctl.fitModel();
    expect(store.get().notices.map((n) => n.text)).toEqual(['Open a file or a demo first.']);
  });

  it('the Firth remedy refits with Firth’s method', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('ssi');
    await ctl.useRemedy('use-firth');
    expect(store.get().fit?.request.method).toBe('firth');
    expect(store.get().fit?.fit.method).toBe('firth');
  });

  it('a cost changed through the controller brings the cost curve and the matrix up to date', async () => {
    const { store, ctl } = harness();
    await ctl.startDemo('ssi');
    await ctl.act(A.changeCosts, { missedCase: 4 });
    const s = store.get();
    expect(s.costView?.optimal.decisionTheory.threshold).toBeCloseTo(1 / 5, 12);
    expect(s.thresholdView?.metrics.threshold).toBe(s.threshold);
    await ctl.act(A.moveCutoff, 0.3);
    expect(store.get().thresholdView?.metrics.threshold).toBe(0.3);
  });

  it('a load and every role change bring the drop report up to date', async () => {
    const { store, ctl } = harness();
    await ctl.pasteText('age\tward\tinfected\n50\tA\tno\n61\t\tyes\n\tB\tyes\n45\tA\tno\n38\tB\tno\n');
    expect(store.get().dropReport).toBeNull();
    await ctl.act(A.changeOutcome, { column: 'infected', event: 'yes' });
    await ctl.act(A.changeRole, { column: 'age', role: { include: true } });
    expect(store.get().dropReport).toMatchObject({ nRows: 5, droppedRows: 1 });
    await ctl.act(A.changeRole, { column: 'ward', role: { include: true } });
    expect(store.get().dropReport).toMatchObject({ nRows: 5, droppedRows: 2 });
    await ctl.act(A.changeRole, { column: 'age', role: { include: false } });
    expect(store.get().dropReport).toMatchObject({ droppedRows: 1 });
    await ctl.pasteText('age\tinfected\n50\tno\n\tyes\n');
    expect(store.get().dropReport).toBeNull();
    await ctl.startDemo('ssi');
    expect(store.get().dropReport?.nRows).toBe(store.get().data?.nRows);
  });

  it('the data summary gives the spreadsheet row of the first data row: 2 below a header, 1 without one', async () => {
    const { store, ctl } = harness();
    await ctl.pasteText('age\tinfected\n50\tno\n61\tyes\n');
    expect(store.get().data?.firstRow).toBe(2);
    store.apply(A.setImportSettings, { header: 'no' });
    await ctl.pasteText('50\tno\n61\tyes\n70\tyes\n');
    expect(store.get().data?.firstRow).toBe(1);
  });

  it('a remedy taken from a notice removes that notice', async () => {
    const { store, ctl } = harness();
    store.apply(A.notify, { kind: 'warning', text: 'Few events.', action: 'reload' });
    const id = store.get().notices[0].id;
    await ctl.useRemedy('reload', id);
    expect(store.get().notices).toEqual([]);
    expect(store.get().view).toBe('data');
  });

  it('a cancelled bootstrap ends as "cancelled" with no error and no job left', async () => {
    const { store, ctl, errors } = harness();
    await ctl.startDemo('ssi');
    const run = ctl.validate(500);
    await new Promise((r) => setTimeout(r, 50));
    const job = store.get().jobs.find((j) => j.label.startsWith('Bootstrap'));
    expect(job?.cancellable).toBe(true);
    ctl.cancel(job!.id);
    await run;
    expect(store.get().validationStatus).toBe('cancelled');
    expect(store.get().jobs).toEqual([]);
    expect(errors).toEqual([]);
  });
});
