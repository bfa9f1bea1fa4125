import { FulcraError, type Column, type Costs, type Dataset } from '../../engine/core';
import type { FitOptions, ModelSpec, OutcomeLayout, TermSpec } from '../../engine/core';
import { base64ToBytes, bytesToBase64 } from './base64';
import { datasetChecksum } from './checksum';
import { FieldChecker, parseJsonFile } from './validate';

/** Current workspace-file schema version (the value of the `fulcraWorkspace` field). */
export const WORKSPACE_FILE_VERSION = 1;

/** Everything the user set up, in plain structured-clone-safe form (the same record goes to IndexedDB). */
export interface Workspace {
  /** Name of the imported data file. */
  fileName: string | null;
  data: Dataset | null;
  /** Outcome, event level and terms (roles of the columns). */
  spec: ModelSpec | null;
  fitOptions: Partial<FitOptions>;
  seed: number | null;
  threshold: number | null;
  costs: Costs | null;
  freeText: { purpose?: string; setting?: string; population?: string; notes?: string };
  /** Further workbench state (JSON-safe: column type overrides, chosen tabs…), kept as is. */
  extra?: Record<string, unknown>;
}

/**
 * Workspace file, schema version 1 (JSON, suggested extension `.fulcra-workspace.json`):
 * `{ fulcraWorkspace: 1, fulcraVersion, saved (ISO 8601), dataChecksum (SHA-256 hex or null), workspace }`
 * where `workspace` is a Workspace whose `data.columns[i]` is encoded compactly:
 * numeric `{kind, name, values: base64 of little-endian float64}`, categorical
 * `{kind, name, levels, codes: base64 of little-endian int32}` (NaN and −1 keep meaning "missing").
 */
export interface WorkspaceFileInfo {
  fulcraVersion: string;
  saved: string;
  dataChecksum: string | null;
}

/** Serialises a workspace to the versioned JSON file text. */
export function workspaceToJson(ws: Workspace, info: { fulcraVersion: string; saved?: string }): string {
  const file = {
    fulcraWorkspace: WORKSPACE_FILE_VERSION,
    fulcraVersion: info.fulcraVersion,
    saved: info.saved ?? new Date().toISOString(),
    dataChecksum: ws.data ? datasetChecksum(ws.data) : null,
    workspace: { ...ws, data: ws.data ? encodeDataset(ws.data) : null },
  };
  return JSON.stringify(file) + '\n';
}

/**
 * Reads a workspace file, checking the schema version, every field's type and the data checksum. Throws
 * FulcraError 'workspace-file-version' (not a workspace file or another version) or 'workspace-file-invalid'
 * (not JSON, missing/wrong field, damaged data) naming the field.
 */
export function readWorkspaceFile(text: string): { workspace: Workspace; info: WorkspaceFileInfo } {
  const raw = parseJsonFile(text, 'workspace-file-invalid', 'Fulcra workspace file');
  const c = new FieldChecker('workspace-file-invalid', 'workspace file');
  const o = c.object(raw, '(file)');
  if (!('fulcraWorkspace' in o)) {
    const hint = 'fulcraModel' in o ? ' It looks like a model file; open it with "Open model".' : '';
    throw new FulcraError(
      'workspace-file-version',
      `This is not a Fulcra workspace file (it has no "fulcraWorkspace" field).${hint}`,
      'Choose a file saved with "Save workspace".',
    );
  }
  if (o.fulcraWorkspace !== WORKSPACE_FILE_VERSION) {
    throw new FulcraError(
      'workspace-file-version',
      `This workspace file has schema version ${JSON.stringify(o.fulcraWorkspace)}; ` +
        `this Fulcra reads version ${WORKSPACE_FILE_VERSION}.`,
      'Open it with the Fulcra version that saved it.',
    );
  }
  const info: WorkspaceFileInfo = {
    fulcraVersion: c.string(o.fulcraVersion, 'fulcraVersion'),
    saved: c.string(o.saved, 'saved'),
    dataChecksum: o.dataChecksum === null ? null : c.string(o.dataChecksum, 'dataChecksum'),
  };
  const w = c.object(o.workspace, 'workspace');
  const data = w.data === null ? null : decodeDataset(c, w.data);
  if (data && info.dataChecksum !== null && datasetChecksum(data) !== info.dataChecksum) {
    c.fail('workspace.data', 'does not match its checksum (the data were changed or damaged)');
  }
  return { workspace: checkWorkspaceFields(c, w, data), info };
}

/** Validates the non-data fields of a workspace record (from a file or from IndexedDB). */
export function checkWorkspaceFields(c: FieldChecker, w: Record<string, unknown>, data: Dataset | null): Workspace {
  const costs = w.costs === null || w.costs === undefined ? null : c.object(w.costs, 'workspace.costs');
  const ft = w.freeText === undefined ? {} : c.object(w.freeText, 'workspace.freeText');
  const ws: Workspace = {
    fileName: w.fileName === null || w.fileName === undefined ? null : c.string(w.fileName, 'workspace.fileName'),
    data,
    spec: w.spec === null || w.spec === undefined ? null : checkSpec(c, w.spec),
    fitOptions: w.fitOptions === undefined ? {} : checkFitOptions(c, w.fitOptions),
    seed: w.seed === null || w.seed === undefined ? null : c.finite(w.seed, 'workspace.seed'),
    threshold: w.threshold === null || w.threshold === undefined ? null : c.finite(w.threshold, 'workspace.threshold'),
    costs: costs ? checkCosts(c, costs) : null,
    freeText: Object.fromEntries(Object.entries(ft).map(([k, v]) => [k, c.string(v, `workspace.freeText.${k}`)])),
  };
  if (w.extra !== undefined) ws.extra = c.object(w.extra, 'workspace.extra');
  return ws;
}

/** The two costs; workspaces saved before the one cost vocabulary name them falseNegative / falsePositive. */
function checkCosts(c: FieldChecker, costs: Record<string, unknown>): Costs {
  if (!('missedCase' in costs) && !('falseAlarm' in costs) && ('falseNegative' in costs || 'falsePositive' in costs)) {
    return {
      missedCase: c.finite(costs.falseNegative, 'workspace.costs.falseNegative'),
      falseAlarm: c.finite(costs.falsePositive, 'workspace.costs.falsePositive'),
    };
  }
  return {
    missedCase: c.finite(costs.missedCase, 'workspace.costs.missedCase'),
    falseAlarm: c.finite(costs.falseAlarm, 'workspace.costs.falseAlarm'),
  };
}

/** A model specification at `at` (the field path named in a refusal). */
export function checkSpec(c: FieldChecker, v: unknown, at = 'workspace.spec'): ModelSpec {
  const s = c.object(v, at);
  const terms = c.array(s.terms, `${at}.terms`).map((x, i): TermSpec => {
    const p = `${at}.terms[${i}]`;
    const t = c.object(x, p);
    const type = c.oneOf(t.type, ['main', 'spline', 'interaction'] as const, `${p}.type`);
    if (type === 'main') {
      const out: TermSpec = { type, column: c.string(t.column, `${p}.column`) };
      if (t.reference !== undefined) out.reference = c.string(t.reference, `${p}.reference`);
      return out;
    }
    if (type === 'spline') {
      const k = c.number(t.knots, `${p}.knots`);
      if (k !== 3 && k !== 4 && k !== 5) c.fail(`${p}.knots`, 'must be 3, 4 or 5');
      return { type, column: c.string(t.column, `${p}.column`), knots: k };
    }
    const cols = c.stringArray(t.columns, `${p}.columns`);
    if (cols.length !== 2) c.fail(`${p}.columns`, 'must name exactly two columns');
    return { type, columns: [cols[0], cols[1]] };
  });
  const spec: ModelSpec = { outcome: c.string(s.outcome, `${at}.outcome`), terms };
  if (s.event !== undefined) spec.event = c.string(s.event, `${at}.event`);
  if (s.layout !== undefined) spec.layout = checkLayout(c, s.layout, `${at}.layout`);
  if (s.weights !== undefined) spec.weights = c.string(s.weights, `${at}.weights`);
  return spec;
}

/** An outcome layout: binary, events with trials, or events with non-events (the column named). */
export function checkLayout(c: FieldChecker, v: unknown, at: string): OutcomeLayout {
  const l = c.object(v, at);
  const kind = c.oneOf(l.kind, ['binary', 'events-trials', 'events-nonevents'] as const, `${at}.kind`);
  if (kind === 'events-trials') return { kind, trials: c.string(l.trials, `${at}.trials`) };
  if (kind === 'events-nonevents') return { kind, nonEvents: c.string(l.nonEvents, `${at}.nonEvents`) };
  return { kind };
}

function checkFitOptions(c: FieldChecker, v: unknown): Partial<FitOptions> {
  const o = c.object(v, 'workspace.fitOptions');
  const out: Partial<FitOptions> = {};
  if (o.method !== undefined)
    out.method = c.oneOf(o.method, ['ml', 'ridge', 'firth'] as const, 'workspace.fitOptions.method');
  for (const k of ['lambda', 'tol', 'maxIter', 'level'] as const)
    if (o[k] !== undefined) out[k] = c.number(o[k], `workspace.fitOptions.${k}`);
  if (o.profile !== undefined) out.profile = c.boolean(o.profile, 'workspace.fitOptions.profile');
  return out;
}

type EncodedColumn =
  | { kind: 'numeric'; name: string; values: string }
  | { kind: 'categorical'; name: string; levels: string[]; codes: string };

/** Encodes a Dataset's columns as base64 of their little-endian bytes (float64 values, int32 codes). */
export function encodeDataset(data: Dataset): EncodedDataset {
  return {
    nRows: data.nRows,
    ...(data.firstRow !== undefined ? { firstRow: data.firstRow } : {}),
    ...(data.rowNumbers ? { rowNumbers: int32ToBase64(data.rowNumbers) } : {}),
    columns: data.columns.map((col): EncodedColumn => {
      if (col.kind === 'numeric') {
        const buf = new Uint8Array(col.values.length * 8);
        const view = new DataView(buf.buffer);
        col.values.forEach((v, i) => view.setFloat64(8 * i, v, true));
        return { kind: 'numeric', name: col.name, values: bytesToBase64(buf) };
      }
      return { kind: 'categorical', name: col.name, levels: [...col.levels], codes: int32ToBase64(col.codes) };
    }),
  };
}

/** A dataset as the workspace file stores it; row numbers only when the rows are not consecutive. */
interface EncodedDataset {
  nRows: number;
  firstRow?: number;
  rowNumbers?: string;
  columns: EncodedColumn[];
}

/** Base64 of little-endian int32 values. */
function int32ToBase64(values: Int32Array): string {
  const buf = new Uint8Array(values.length * 4);
  const view = new DataView(buf.buffer);
  values.forEach((v, i) => view.setInt32(4 * i, v, true));
  return bytesToBase64(buf);
}

/** The int32 values of a base64 field that must hold exactly `n` of them. */
function base64ToInt32(c: FieldChecker, text: unknown, n: number, path: string): Int32Array {
  const bytes = base64ToBytes(c.string(text, path));
  if (!bytes) c.fail(path, 'is not valid base64');
  if (bytes.length !== n * 4) c.fail(path, `holds ${bytes.length / 4} values; nRows is ${n}`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return Int32Array.from({ length: n }, (_, r) => view.getInt32(4 * r, true));
}

function decodeDataset(c: FieldChecker, v: unknown): Dataset {
  const d = c.object(v, 'workspace.data');
  const nRows = c.number(d.nRows, 'workspace.data.nRows');
  if (!Number.isInteger(nRows) || nRows < 0) c.fail('workspace.data.nRows', 'must be a whole number ≥ 0');
  let firstRow: number | undefined;
  if (d.firstRow !== undefined) {
    firstRow = c.number(d.firstRow, 'workspace.data.firstRow');
    if (!Number.isInteger(firstRow) || firstRow < 1) c.fail('workspace.data.firstRow', 'must be a whole number ≥ 1');
  }
  const columns = c.array(d.columns, 'workspace.data.columns').map((x, i): Column => {
    const p = `workspace.data.columns[${i}]`;
    const col = c.object(x, p);
    const kind = c.oneOf(col.kind, ['numeric', 'categorical'] as const, `${p}.kind`);
    const name = c.string(col.name, `${p}.name`);
    if (kind === 'numeric') {
      const bytes = base64ToBytes(c.string(col.values, `${p}.values`));
      if (!bytes) c.fail(`${p}.values`, 'is not valid base64');
      if (bytes.length !== nRows * 8) c.fail(`${p}.values`, `holds ${bytes.length / 8} values; nRows is ${nRows}`);
      const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
      return { kind, name, values: Float64Array.from({ length: nRows }, (_, r) => view.getFloat64(8 * r, true)) };
    }
    const codes = base64ToInt32(c, col.codes, nRows, `${p}.codes`);
    const levels = c.stringArray(col.levels, `${p}.levels`);
    const bad = codes.findIndex((k) => k < -1 || k >= levels.length);
    if (bad >= 0) {
      c.fail(`${p}.codes`, `has code ${codes[bad]} at position ${bad + 1}, outside the ${levels.length} levels`);
    }
    return { kind, name, levels, codes };
  });
  const out: Dataset = { nRows, columns };
  if (firstRow !== undefined) out.firstRow = firstRow;
  if (d.rowNumbers !== undefined) {
    out.rowNumbers = base64ToInt32(c, d.rowNumbers, nRows, 'workspace.data.rowNumbers');
    const bad = out.rowNumbers.findIndex((r, i) => r < 1 || (i > 0 && r <= out.rowNumbers![i - 1]));
    if (bad >= 0) c.fail('workspace.data.rowNumbers', `must be increasing whole numbers ≥ 1 (position ${bad + 1})`);
  }
  return out;
}

/** gzip (RFC 1952) of the workspace file text, for large data: suggested extension `.fulcra-workspace.json.gz`. */
export async function workspaceToGzip(
  ws: Workspace,
  info: { fulcraVersion: string; saved?: string },
): Promise<Uint8Array> {
  const stream = new Blob([workspaceToJson(ws, info)]).stream().pipeThrough(new CompressionStream('gzip'));
  return new Uint8Array(await new Response(stream).arrayBuffer());
}

/** Reads a workspace file given as bytes, plain UTF-8 JSON or gzip-compressed (detected by its magic bytes 1f 8b). */
export async function readWorkspaceBytes(
  bytes: Uint8Array,
): Promise<{ workspace: Workspace; info: WorkspaceFileInfo }> {
  if (bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b) {
    let text: string;
    try {
      const stream = new Blob([new Uint8Array(bytes)]).stream().pipeThrough(new DecompressionStream('gzip'));
      text = await new Response(stream).text();
    } catch (e) {
      throw new FulcraError(
        'workspace-file-invalid',
        `This compressed workspace file is damaged (${(e as Error).message}).`,
        'Export the workspace again.',
      );
    }
    return readWorkspaceFile(text);
  }
  const text = new TextDecoder('utf-8').decode(bytes);
  const kind = spreadsheetKind(bytes, text);
  if (kind) {
    throw new FulcraError(
      'workspace-file-spreadsheet',
      `This looks like a spreadsheet (${kind}), not a workspace file — use "Open a spreadsheet".`,
      'Open it with "Open a spreadsheet"; a workspace file is one saved with "Save workspace".',
    );
  }
  return readWorkspaceFile(text);
}

/**
 * Names the spreadsheet kind when bytes given as a workspace file are one: an xlsx (zip signature PK\x03\x04),
 * an old .xls (OLE signature D0 CF 11 E0), or delimited text (not JSON, and its first lines split on commas,
 * semicolons or tabs into the same number of at least two fields). Null otherwise.
 */
function spreadsheetKind(bytes: Uint8Array, text: string): string | null {
  const starts = (sig: number[]): boolean => bytes.length >= sig.length && sig.every((b, i) => bytes[i] === b);
  if (starts([0x50, 0x4b, 0x03, 0x04])) return 'an .xlsx file';
  if (starts([0xd0, 0xcf, 0x11, 0xe0])) return 'an old .xls file';
  const body = text.replace(/^\uFEFF/, '').trimStart();
  if (body === '' || body.startsWith('{') || body.startsWith('[')) return null;
  const lines = body.split(/\r?\n/, 6).filter((l) => l.trim() !== '');
  if (lines.length < 2) return null;
  for (const [sep, name] of [
    ['\t', 'tab-separated text'],
    [';', 'semicolon-separated text'],
    [',', 'comma-separated text'],
  ] as const) {
    const n = lines[0].split(sep).length;
    if (n >= 2 && lines.slice(0, 5).every((l) => l.split(sep).length === n)) return name;
  }
  return null;
}
