import { describe, expect, it } from 'vitest';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import * as A from '../../src/state/actions';
import type { WorkerClient } from '../../src/bridge/workerClient';
import { createApi } from '../../src/worker/api';
import { proposeOutcomeColumn } from '../../src/io/outcome';

/** The page's controller wired to the real worker api in-process (no Worker, no Comlink). */
function harness() {
  const api = createApi();
  const errors: string[] = [];
  const report = (e: unknown) => {
    errors.push((e as Error).message ?? String(e));
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

/** Tab-separated cells as copied from a spreadsheet: `grade` holds small whole numbers, two yes/no columns. */
function cells(withSmoker: boolean): string {
  const head = ['age', 'grade', 'sex', ...(withSmoker ? ['smoker'] : []), 'died'];
  const rows = [head.join('\t')];
  for (let i = 0; i < 40; i++) {
    const row = [String(20 + ((i * 7) % 50)), String(1 + (i % 3)), i % 2 ? 'F' : 'M'];
    if (withSmoker) row.push(i % 3 ? 'no' : 'yes');
    row.push(i % 4 === 0 || i % 7 === 0 ? 'yes' : 'no');
    rows.push(row.join('\t'));
  }
  return rows.join('\n') + '\n';
}

describe('pasted cells, read like a file', () => {
  it('a pasted column can be read as another type: the pasted cells are read again, with the reason', async () => {
    const { store, ctl, errors } = harness();
    await ctl.pasteText(cells(false));
    const grade = () => store.get().data!.columns.find((c) => c.name === 'grade')!;
    expect(store.get().data!.source.kind).toBe('paste');
    expect(grade().type).toBe('numeric');
    await ctl.act(A.readColumnAs, { column: 'grade', type: 'categorical' });
    expect(errors).toEqual([]);
    expect(grade().type).toBe('categorical');
    expect(grade().kind).toBe('categorical');
    expect(grade().levels).toEqual(['1', '2', '3']);
    expect(grade().reason).not.toBe('');
    // The outcome the user had stays across the re-read.
    expect(store.get().outcome).toBe('died');
  });

  it('new pasted cells start without the type choices made for the previous ones', async () => {
    const { store, ctl } = harness();
    await ctl.pasteText(cells(false));
    await ctl.act(A.readColumnAs, { column: 'grade', type: 'categorical' });
    await ctl.pasteText(cells(true));
    expect(store.get().importSettings.columnTypes).toEqual({});
    expect(store.get().data!.columns.find((c) => c.name === 'grade')!.type).toBe('numeric');
  });
});

describe('the outcome is proposed only when exactly one column is a plausible yes/no outcome', () => {
  it('one yes/no column: it is preselected with its event, and the page says so', async () => {
    const { store, ctl } = harness();
    await ctl.pasteText(cells(false));
    const s = store.get();
    expect([s.outcome, s.event]).toEqual(['died', 'yes']);
    expect(s.roles.died.include).toBe(false);
    expect(s.notices.map((n) => n.text).join(' ')).toMatch(/"died" is proposed as the outcome/);
  });

  it('two yes/no columns: no outcome is chosen, and the hint names both', async () => {
    const { store, ctl } = harness();
    await ctl.pasteText(cells(true));
    const s = store.get();
    expect(s.outcome).toBeNull();
    expect(s.event).toBeNull();
    expect(s.notices.map((n) => n.text).join(' ')).toMatch(
      /2 columns could be the yes\/no outcome \("smoker", "died"\)/,
    );
  });

  it('the rule: not-for-modelling and unrecognised two-value columns do not count', () => {
    const col = (name: string, proposedEvent: string | null, modelling = true) => ({ name, proposedEvent, modelling });
    expect(proposeOutcomeColumn([col('sex', null), col('died', 'yes'), col('id', '1', false)])).toMatchObject({
      status: 'proposed',
      column: 'died',
      event: 'yes',
    });
    expect(proposeOutcomeColumn([col('sex', null), col('age', null)])).toMatchObject({
      status: 'choose',
      candidates: [],
    });
    expect(proposeOutcomeColumn([col('low', '1'), col('smoke', '1'), col('ht', '1')])).toMatchObject({
      status: 'choose',
      candidates: ['low', 'smoke', 'ht'],
      hint: expect.stringContaining('"low", "smoke", "ht"'),
    });
  });
});
