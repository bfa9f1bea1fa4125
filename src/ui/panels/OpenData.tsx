import { useId, useState, type DragEvent } from 'react';
import { useEnv } from '../context';
import { PasteBox } from './PasteBox';
import { ReadingOptions } from './ReadingOptions';

/** File picker, drag-and-drop target and paste box. Files and pasted cells are read in the worker, never uploaded. */
export function OpenData({ compact = false }: { compact?: boolean }) {
  const { ctl } = useEnv();
  const id = useId();
  const [over, setOver] = useState(false);
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
      {!compact && <PasteBox />}
    </section>
  );
}
