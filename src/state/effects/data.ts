/** Data in: demos, files and pasted cells into the worker; the copy of the data this side keeps; the grid's rows. */
import type { DemoId } from '../../engine/demo';
import type { DataSummary, RowsWindow } from '../../worker/protocol';
import * as A from '../actions';
import { importOptionsOf } from '../appState';
import type { HeldData } from '../workspace';
import { nextSerial, type EffectContext } from './context';

export interface DataEffects {
  startDemo(id: DemoId): Promise<void>;
  openFile(file: File): Promise<void>;
  /** Reads the last opened file or pasted cells again with the current import settings (column types too). */
  reread(): Promise<void>;
  pasteText(text: string): Promise<void>;
  getRows(start: number, count: number): Promise<RowsWindow | undefined>;
  /** The rows the current roles would leave out (none asked for until the model can be built). */
  refreshDropReport(): Promise<void>;
  /** The data loaded now, as fetched back from the worker after the load (null before any load). */
  held(): HeldData | null;
  /** Called with the new held data after every load (and with null on "Start afresh"). */
  onHeld(listener: (held: HeldData | null) => void): void;
  /** Forgets the data and every setting. */
  startAfresh(): void;
}

export interface DataLoading extends DataEffects {
  /** Replaces the held data (a restore brings its own) and tells the listeners. */
  setHeld(held: HeldData | null): void;
}

/** An id for data loaded now: unique on this page and across reloads. */
export const newDataId = (): string => `${Date.now().toString(36)}-${nextSerial()}`;

export function dataLoading(ctx: EffectContext, fitModel: () => Promise<void>): DataLoading {
  const { store, client, s, job } = ctx;
  let lastFile: File | null = null;
  /** The last pasted text, kept so a column of pasted cells can be read as another type, as a file's can. */
  let lastPaste: string | null = null;
  let held: HeldData | null = null;
  const listeners = new Set<(h: HeldData | null) => void>();
  const setHeld = (h: HeldData | null) => {
    held = h;
    for (const l of listeners) l(h);
  };

  async function refreshDropReport() {
    const built = A.buildSpec(s());
    if ('problem' in built) {
      store.apply(A.dropReportDone, null);
      return;
    }
    const report = await client.latest('drop', (api) => api.dropReport(built.spec));
    if (report) store.apply(A.dropReportDone, report);
  }

  /** A load finished: its summary goes to the store, a copy of its data is kept, and the drop report follows. */
  async function loaded(summary: DataSummary | undefined): Promise<boolean> {
    if (!summary) return false;
    store.apply(A.dataLoaded, summary);
    const got = await client.call((api) => api.getDataset());
    setHeld(got ? { id: newDataId(), data: got.data, summary: got.summary } : null);
    await refreshDropReport();
    return true;
  }

  async function openFile(file: File) {
    if (lastFile !== file) store.apply(A.setImportSettings, { columnTypes: {}, sheet: null });
    lastFile = file;
    lastPaste = null;
    const bytes = await file.arrayBuffer();
    const options = importOptionsOf(s().importSettings);
    await loaded(
      await job(`Reading ${file.name}`, true, (id, onProgress) =>
        client.call((api) => api.importFile(client.transfer(bytes, [bytes]), file.name, options, id, onProgress)),
      ),
    );
  }

  async function pasteText(text: string) {
    if (lastPaste !== text) store.apply(A.setImportSettings, { columnTypes: {}, sheet: null });
    lastPaste = text;
    lastFile = null;
    await loaded(
      await job('Reading pasted cells', true, (id, onProgress) =>
        client.call((api) => api.importText(text, importOptionsOf(s().importSettings), id, onProgress)),
      ),
    );
  }

  return {
    setHeld,
    async startDemo(id) {
      const summary = await job('Generating the invented demo', false, () => client.call((api) => api.loadDemo(id)));
      if (await loaded(summary)) await fitModel();
    },
    openFile,
    async reread() {
      if (lastFile) await openFile(lastFile);
      else if (lastPaste !== null) await pasteText(lastPaste);
    },
    pasteText,
    getRows: (start, count) => client.latest('rows', (api) => api.getRows(start, count)),
    refreshDropReport,
    held: () => held,
    onHeld: (listener) => {
      listeners.add(listener);
    },
    startAfresh() {
      setHeld(null);
      store.apply(A.startAfresh, undefined);
    },
  };
}
