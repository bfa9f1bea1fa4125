import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { WorkerClient } from '../../src/bridge/workerClient';
import * as A from '../../src/state/actions';
import { initialState } from '../../src/state/appState';
import { createController } from '../../src/state/controller';
import { createStore } from '../../src/state/store';
import { settingsFromWorkspace, toWorkspace } from '../../src/state/workspace';
import { createApi } from '../../src/worker/api';
import type { DataSummary } from '../../src/worker/protocol';

/** The page's controller on the real worker api in-process. */
function harness() {
  const api = createApi();
  const client: WorkerClient = {
    call: (run) => run(api as never),
    latest: (_key, run) => run(api as never),
    progress: (fn) => fn,
    transfer: (v) => v,
    cancel: () => {},
    restart: () => {},
    terminate: () => {},
  };
  const store = createStore();
  return { store, ctl: createController(store, client) };
}

const fileSummary: DataSummary = {
  source: { kind: 'file', name: 'mine.csv', notice: null },
  nRows: 3,
  columns: [],
  warnings: [],
  suggestedSpec: null,
  truth: null,
  format: null,
};

describe('the cautions setting (clinical or industrial / quality)', () => {
  it('is set by each demo: the surgical registry clinical, the seal plant quality', async () => {
    const h = harness();
    await h.ctl.startDemo('seals');
    expect(h.store.get().reportText.cautions).toBe('quality');
    await h.ctl.startDemo('ssi');
    expect(h.store.get().reportText.cautions).toBe('clinical');
  });

  it("goes back to the default for the user's own file after a demo, and a user's choice survives a new file", () => {
    const seals: DataSummary = { ...fileSummary, source: { kind: 'demo', name: 'Seals', notice: null } };
    const demo = A.dataLoaded(initialState, { ...seals, cautions: 'quality' });
    expect(demo.reportText.cautions).toBe('quality');
    expect(A.dataLoaded(demo, fileSummary).reportText.cautions).toBeUndefined();
    const chosen = A.setReportText(A.dataLoaded(initialState, fileSummary), { cautions: 'quality', purpose: 'QC' });
    const next = A.dataLoaded(chosen, { ...fileSummary, source: { ...fileSummary.source, name: 'other.csv' } });
    expect(next.reportText).toEqual({ cautions: 'quality', purpose: 'QC' });
  });

  it('is kept in the workspace and comes back with it', () => {
    const s = A.setReportText(A.dataLoaded(initialState, fileSummary), { cautions: 'quality' });
    const ws = JSON.parse(JSON.stringify(toWorkspace(s, null, false)));
    expect(settingsFromWorkspace(ws).reportText.cautions).toBe('quality');
    const restored = A.workspaceRestored(initialState, { summary: fileSummary, settings: settingsFromWorkspace(ws) });
    expect(restored.reportText.cautions).toBe('quality');
  });

  it('travels to the PDF: the seal demo prints the quality-system cautions, not the clinical ones', async () => {
    const h = harness();
    await h.ctl.startDemo('seals');
    const pdf = async () => {
      const path = join(mkdtempSync(join(tmpdir(), 'fulcra-cautions-')), 'summary.pdf');
      writeFileSync(path, (await h.ctl.modelReport(h.store.get().reportText))!);
      return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
    };
    const quality = await pdf();
    expect(quality).toContain('not a validated measuring or control system');
    expect(quality).toContain('your quality system and local procedures');
    expect(quality).not.toContain('medical device');
    h.store.apply(A.setReportText, { cautions: 'clinical' });
    const clinical = await pdf();
    expect(clinical).toContain('not a medical device');
    expect(clinical).not.toContain('quality system');
  });
});
