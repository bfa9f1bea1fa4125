import { expectFulcraError } from './expectFulcraError';
import { getAt, setAt } from './editJson';
import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../src/engine/core/data';
import { fit } from '../../src/engine/fitting/fit';
import { gunzipSync } from 'node:zlib';
import {
  readWorkspaceBytes,
  readWorkspaceFile,
  workspaceToGzip,
  workspaceToJson,
  type Workspace,
} from '../../src/io/export/workspaceFile';
import { datasetChecksum } from '../../src/io/export/checksum';
import { birthwtSpec, loadBirthwt } from '../report/birthwtRecord';

function workspace(): Workspace {
  const birthwt = loadBirthwt();
  const data: Dataset = {
    nRows: birthwt.nRows,
    columns: [
      ...birthwt.columns,
      {
        kind: 'numeric',
        name: 'with gaps',
        values: Float64Array.from({ length: birthwt.nRows }, (_, i) => (i % 7 === 0 ? NaN : i / 3)),
      },
      {
        kind: 'categorical',
        name: 'ward \u00e9\u03b2',
        levels: ['A', 'B \u2265 2'],
        codes: Int32Array.from({ length: birthwt.nRows }, (_, i) => (i % 5 === 0 ? -1 : i % 2)),
      },
    ],
  };
  return {
    fileName: 'birthwt.csv',
    data,
    spec: birthwtSpec,
    fitOptions: { method: 'firth', level: 0.9, profile: false },
    seed: 42,
    threshold: 0.2,
    costs: { missedCase: 4, falseAlarm: 1 },
    freeText: { purpose: 'Audit \u2264 30 days', setting: 'Ward 3', population: 'adults' },
    extra: { columnTypes: { race: 'categorical' }, tab: 'threshold' },
  };
}

const info = { fulcraVersion: '0.1.0', saved: '2026-12-02T01:50:00Z' };

describe('workspace file', () => {
  it('round-trips every part of the workspace, typed arrays bit for bit (NaN and −1 missing kept)', () => {
    const ws = workspace();
    const back = readWorkspaceFile(workspaceToJson(ws, info));
    expect(back.info).toEqual({
      fulcraVersion: '0.1.0',
      saved: '2026-12-02T01:50:00Z',
      dataChecksum: datasetChecksum(ws.data!),
    });
    expect(back.workspace).toEqual(ws);
    for (const [i, c] of ws.data!.columns.entries()) {
      const d = back.workspace.data!.columns[i];
      if (c.kind === 'numeric') expect(d.kind === 'numeric' && d.values instanceof Float64Array).toBe(true);
      else expect(d.kind === 'categorical' && d.codes instanceof Int32Array).toBe(true);
    }
  });

  it('keeps the spreadsheet row numbers: the first data row (1 without a header) and every row after a gap', () => {
    const ws = workspace();
    ws.data = { ...ws.data!, firstRow: 1 };
    expect(readWorkspaceFile(workspaceToJson(ws, info)).workspace.data!.firstRow).toBe(1);
    const plain = workspace();
    expect(readWorkspaceFile(workspaceToJson(plain, info)).workspace.data!.firstRow).toBeUndefined();
    const gaps = Int32Array.from({ length: ws.data!.nRows }, (_, i) => 2 + i + (i >= 3 ? 1 : 0));
    const withGaps = { ...ws, data: { ...ws.data!, firstRow: 2, rowNumbers: gaps } };
    expect(readWorkspaceFile(workspaceToJson(withGaps, info)).workspace.data!.rowNumbers).toEqual(gaps);
    const badGaps = { ...ws, data: { ...ws.data!, rowNumbers: gaps.map((r, i) => (i === 4 ? 1 : r)) } };
    expect(() => readWorkspaceFile(workspaceToJson(badGaps, info))).toThrow(/rowNumbers.*position 5/);
    expect(() => readWorkspaceFile(workspaceToJson({ ...ws, data: { ...ws.data!, firstRow: 0 } }, info))).toThrow(
      /workspace\.data\.firstRow/,
    );
  });

  it('reads a file saved before the one cost vocabulary (costs named falseNegative / falsePositive)', () => {
    const old = workspaceToJson(workspace(), info).replace(
      '"costs":{"missedCase":4,"falseAlarm":1}',
      '"costs":{"falseNegative":4,"falsePositive":1}',
    );
    expect(old).toContain('"falseNegative":4');
    expect(readWorkspaceFile(old).workspace.costs).toEqual({ missedCase: 4, falseAlarm: 1 });
  });

  it('re-opens to the same fit', () => {
    const ws = workspace();
    const back = readWorkspaceFile(workspaceToJson(ws, info)).workspace;
    const a = fit(ws.data!, ws.spec!, ws.fitOptions);
    const b = fit(back.data!, back.spec!, back.fitOptions);
    expect(b.coefficients.map((c) => c.estimate)).toEqual(a.coefficients.map((c) => c.estimate));
  });

  it('stores columns compactly (base64 of the bytes: about 4/3 of 8 bytes per number)', () => {
    const ws = workspace();
    const text = workspaceToJson(ws, info);
    const rawBytes = ws.data!.columns.reduce((s, c) => s + (c.kind === 'numeric' ? 8 : 4) * ws.data!.nRows, 0);
    expect(text.length).toBeLessThan(rawBytes * 1.34 + 2000);
  });

  it('writes a gzip file that Node’s zlib inflates to the same JSON, and reads gzip or plain bytes back', async () => {
    const ws = workspace();
    const gz = await workspaceToGzip(ws, info);
    expect(gunzipSync(gz).toString('utf8')).toBe(workspaceToJson(ws, info));
    expect(gz.length).toBeLessThan(workspaceToJson(ws, info).length);
    expect((await readWorkspaceBytes(gz)).workspace).toEqual(ws);
    expect((await readWorkspaceBytes(new TextEncoder().encode(workspaceToJson(ws, info)))).workspace).toEqual(ws);
    const broken = gz.slice(0, gz.length - 20);
    await expect(readWorkspaceBytes(broken)).rejects.toThrow(/compressed workspace file is damaged/);
  });

  it('saves and reads a workspace with no data yet', () => {
    const ws: Workspace = {
      fileName: null,
      data: null,
      spec: null,
      fitOptions: {},
      seed: null,
      threshold: null,
      costs: null,
      freeText: {},
    };
    expect(readWorkspaceFile(workspaceToJson(ws, info)).workspace).toEqual(ws);
  });

  it('refuses another version, a model file, damaged data and wrong fields, naming what is wrong', () => {
    const good = JSON.parse(workspaceToJson(workspace(), info));
    const edit = (f: (o: unknown) => void) => {
      const o = structuredClone(good);
      f(o);
      return JSON.stringify(o);
    };
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['fulcraWorkspace'], 3))),
      'workspace-file-version',
      /schema version 3/,
    );
    expectFulcraError(() => readWorkspaceFile('{"fulcraModel":1}'), 'workspace-file-version', /model file/);
    expectFulcraError(() => readWorkspaceFile('not json'), 'workspace-file-invalid', /not valid JSON/);
    const flip = (s: string) => (s[10] === 'A' ? 'B' : 'A');
    expectFulcraError(
      () =>
        readWorkspaceFile(
          edit((o) => {
            const path = ['workspace', 'data', 'columns', 1, 'values'];
            const s = getAt(o, path) as string;
            setAt(o, path, s.slice(0, 10) + flip(s) + s.slice(11));
          }),
        ),
      'workspace-file-invalid',
      /"workspace\.data" does not match its checksum/,
    );
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['workspace', 'data', 'columns', 2, 'values'], 'AAAA'))),
      'workspace-file-invalid',
      /"workspace\.data\.columns\[2\]\.values" holds 0\.375 values; nRows is 189/,
    );
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['workspace', 'data', 'columns', 0, 'values'], '@@@@'))),
      'workspace-file-invalid',
      /is not valid base64/,
    );
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['workspace', 'spec', 'terms', 0, 'type'], 'square'))),
      'workspace-file-invalid',
      /"workspace\.spec\.terms\[0\]\.type" must be one of main, spline, interaction/,
    );
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['workspace', 'costs', 'falseAlarm'], 'one'))),
      'workspace-file-invalid',
      /"workspace\.costs\.falseAlarm" must be a number/,
    );
    expectFulcraError(
      () => readWorkspaceFile(edit((o) => setAt(o, ['workspace', 'data', 'columns', 3, 'levels'], ['1']))),
      'workspace-file-invalid',
      /checksum|outside the 1 levels/,
    );
  });
});
