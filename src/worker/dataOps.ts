import type { Dataset } from '../engine/core';
import { generateDemo, type DemoId } from '../engine/demo';
import { proposeCountLayout, proposeOutcomeEvent } from '../io';
import type { ColumnInfo, ImportResult } from '../io/types';
import { MAX_LEVELS, profileColumn, viewBins } from './profile';
import type { CautionSetting } from '../report';
import type { ColumnView, DataSummary } from './protocol';
import type { Session } from './session';

/** The setting each invented demo stands for: a surgical registry, a packaging plant. */
const DEMO_CAUTIONS: Record<DemoId, CautionSetting> = { ssi: 'clinical', seals: 'quality', 'ssi-counts': 'clinical' };

/** Loads an invented demo into the session. */
export function loadDemo(s: Session, id: DemoId): DataSummary {
  const demo = generateDemo(id);
  return setData(s, demo.dataset, {
    source: { kind: 'demo', name: demo.title, notice: demo.notice },
    nRows: demo.dataset.nRows,
    columns: demo.dataset.columns.map((c) => ({ ...profileColumn(c), proposedEvent: proposedEvent(c) })),
    warnings: [],
    suggestedSpec: demo.spec,
    cautions: DEMO_CAUTIONS[id],
    truth: demo.truth,
    format: null,
  });
}

/** Loads an import result into the session, keeping the importer's types, reasons and profiles. */
export function loadImported(s: Session, result: ImportResult, kind: 'file' | 'paste', name: string): DataSummary {
  const columns = result.dataset.columns.map((col, k) => fromInfo(col, result.columns[k]));
  return setData(s, result.dataset, {
    source: { kind, name, notice: null },
    nRows: result.dataset.nRows,
    columns,
    warnings: result.warnings,
    suggestedSpec: null,
    countLayout: proposeCountLayout(result.dataset),
    truth: null,
    format: result.format,
    firstRow: result.dataset.firstRow ?? 2,
  });
}

/**
 * Loads a data set the page kept (after an engine restart, or from a saved workspace). The summary the page
 * saved with it keeps the importer's types and reasons; without one the columns are profiled afresh.
 */
export function loadHeld(s: Session, data: Dataset, summary: DataSummary | null, name: string): DataSummary {
  return setData(
    s,
    data,
    summary ?? {
      source: { kind: 'file', name, notice: null },
      nRows: data.nRows,
      columns: data.columns.map((c) => ({ ...profileColumn(c), proposedEvent: proposedEvent(c) })),
      warnings: [],
      suggestedSpec: null,
      countLayout: proposeCountLayout(data),
      truth: null,
      format: null,
      firstRow: data.firstRow ?? 2,
    },
  );
}

/** A copy of the loaded data (its own buffers, so they can be transferred) with its summary. */
export function heldCopy(s: Session): { data: Dataset; summary: DataSummary; buffers: ArrayBuffer[] } | null {
  if (!s.data || !s.summary) return null;
  const buffers: ArrayBuffer[] = [];
  const columns = s.data.columns.map((c) => {
    if (c.kind === 'numeric') {
      const values = c.values.slice();
      buffers.push(values.buffer);
      return { ...c, values };
    }
    const codes = c.codes.slice();
    buffers.push(codes.buffer);
    return { ...c, codes, levels: [...c.levels] };
  });
  const data: Dataset = { nRows: s.data.nRows, columns };
  if (s.data.firstRow !== undefined) data.firstRow = s.data.firstRow;
  if (s.data.rowNumbers) {
    data.rowNumbers = s.data.rowNumbers.slice();
    buffers.push(data.rowNumbers.buffer as ArrayBuffer);
  }
  return { data, summary: s.summary, buffers };
}

function setData(s: Session, data: Dataset, summary: DataSummary): DataSummary {
  s.data = data;
  s.summary = summary;
  s.record = null;
  s.y = null;
  s.risk = null;
  s.prepared = null;
  s.imputed = null;
  return summary;
}

function fromInfo(col: Dataset['columns'][number], info: ColumnInfo | undefined): ColumnView {
  if (!info) return profileColumn(col);
  const p = info.profile;
  // The importer has profiled the column already: only the levels the page offers come from the column itself.
  const base = {
    name: col.name,
    kind: col.kind,
    levels:
      col.kind === 'categorical'
        ? col.levels.slice(0, MAX_LEVELS)
        : p.distinct === 2
          ? [String(p.min), String(p.max)]
          : [],
  };
  const type = info.type === 'empty' ? 'text' : info.type;
  return {
    ...base,
    type,
    reason: info.reason + (info.note ? ` ${info.note}` : ''),
    modelling: info.modelling,
    levels: info.modelling ? base.levels : [],
    missing: p.missing,
    distinct: p.distinct,
    min: Number.isFinite(p.min) ? p.min : null,
    median: Number.isFinite(p.median) ? p.median : null,
    max: Number.isFinite(p.max) ? p.max : null,
    bins: viewBins(p),
    proposedEvent: proposedEvent(col),
  };
}

function proposedEvent(col: Dataset['columns'][number]): string | null {
  const p = proposeOutcomeEvent(col);
  return p.status === 'proposed' ? p.event : null;
}
