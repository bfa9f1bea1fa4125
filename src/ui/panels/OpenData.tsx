import { useId, useState, type DragEvent } from 'react';
import { useEnv } from '../context';
import { thenFocusResult } from '../resultFocus';
import { ReadingOptions } from './ReadingOptions';

/** File picker, drag-and-drop target and paste box. Files are read in the worker, never uploaded. */
export function OpenData({ compact = false }: { compact?: boolean }) {
  const { ctl, store } = useEnv();
  const id = useId();
  const [over, setOver] = useState(false);
  const [pasted, setPasted] = useState('');
  /** Reads the pasted cells; the data view's heading then takes focus. */
  const readPasted = () => {
    const before = store.get().data;
    return thenFocusResult(ctl.pasteText(pasted), 'data', () => {
      const now = store.get().data;
      return now !== before && now?.source.kind === 'paste';
    });
  };
  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    const f = e.dataTransfer.files[0];
    if (f) void ctl.openFile(f);
  };
  return (
    <section
      className={`open ${over ? 'over' : ''} ${compact ? 'compact' : ''}`}
      onDragOver={(e) => {
        e.preventDefault();
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={onDrop}
      aria-label="Open your own data"
    >
      <div>
        <label htmlFor={`${id}-file`} className="button-like">
          Open a spreadsheet (.csv, .tsv, .txt, .xlsx)
        </label>
        <input
          id={`${id}-file`}
          data-testid="file-input"
          type="file"
          accept=".csv,.tsv,.txt,.xlsx,text/csv,text/plain"
          className="visually-hidden"
          onChange={(e) => {
            const f = e.target.files?.[0];
            if (f) void ctl.openFile(f);
            e.target.value = '';
          }}
        />
        <span className="hint"> or drop a file here. It is read on this computer only.</span>
      </div>
      <ReadingOptions />
      {!compact && (
        <div className="paste">
          <label htmlFor={`${id}-paste`}>Or paste cells copied from a spreadsheet (first row = column names)</label>
          <textarea id={`${id}-paste`} rows={3} value={pasted} onChange={(e) => setPasted(e.target.value)} />
          <button type="button" disabled={!pasted.trim()} onClick={() => void readPasted()}>
            Use pasted cells
          </button>
        </div>
      )}
    </section>
  );
}
