import * as A from '../../state/actions';
import type { ImportSettings } from '../../state/appState';
import type { ImportFormat } from '../../io/types';
import { useApp, useEnv } from '../context';

/** Manual overrides of what the importer detects; applies to the next file, or re-reads the current one. */
export function ReadingOptions() {
  const { store, ctl } = useEnv();
  const settings = useApp((s) => s.importSettings);
  const data = useApp((s) => s.data);
  const rereadable = data?.source.kind === 'file' || data?.source.kind === 'paste';
  const set = (patch: Partial<ImportSettings>) => store.apply(A.setImportSettings, patch);
  const sheets = data?.format?.sheets ?? [];
  return (
    <details className="reading">
      <summary>How to read the file{data?.format ? ` (read as ${describe(data.format)})` : ''}</summary>
      <div className="row">
        <label>
          Separator
          <select
            value={settings.delimiter}
            onChange={(e) => set({ delimiter: e.target.value as ImportSettings['delimiter'] })}
          >
            <option value="auto">detect</option>
            <option value=",">comma</option>
            <option value=";">semicolon</option>
            <option value={'\t'}>tab</option>
            <option value="|">vertical bar</option>
          </select>
        </label>
        <label>
          Decimal mark
          <select
            value={settings.decimal}
            onChange={(e) => set({ decimal: e.target.value as ImportSettings['decimal'] })}
          >
            <option value="auto">detect</option>
            <option value=".">point (1.5)</option>
            <option value=",">comma (1,5)</option>
          </select>
        </label>
        <label>
          Text encoding
          <select
            value={settings.encoding}
            onChange={(e) => set({ encoding: e.target.value as ImportSettings['encoding'] })}
          >
            <option value="auto">detect</option>
            <option value="utf-8">UTF-8</option>
            <option value="windows-1252">Windows-1252</option>
          </select>
        </label>
        <label>
          First row holds column names
          <select value={settings.header} onChange={(e) => set({ header: e.target.value as ImportSettings['header'] })}>
            <option value="auto">detect</option>
            <option value="yes">yes</option>
            <option value="no">no</option>
          </select>
        </label>
        {sheets.length > 1 && (
          <label>
            Sheet
            <select
              value={settings.sheet ?? data?.format?.sheet ?? ''}
              onChange={(e) => set({ sheet: e.target.value })}
            >
              {sheets.map((sh) => (
                <option key={sh}>{sh}</option>
              ))}
            </select>
          </label>
        )}
        {rereadable && (
          <button type="button" onClick={() => void ctl.reread()}>
            {data?.source.kind === 'paste'
              ? 'Read the pasted cells again with these settings'
              : 'Read the file again with these settings'}
          </button>
        )}
      </div>
    </details>
  );
}

function describe(f: ImportFormat): string {
  if (f.kind === 'xlsx') return `workbook, sheet "${f.sheet ?? ''}"`;
  const sep =
    f.delimiter === '\t'
      ? 'tab'
      : f.delimiter === ','
        ? 'comma'
        : f.delimiter === ';'
          ? 'semicolon'
          : (f.delimiter ?? '?');
  const decimal = f.decimal === ',' ? 'comma' : 'point';
  return `${sep}-separated, decimal ${decimal}, ${f.encoding ?? ''}${f.header ? ', header row' : ', no header row'}`;
}
