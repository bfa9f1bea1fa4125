import { useId, useRef, useState, type ClipboardEvent } from 'react';
import { useEnv } from '../context';
import { describePaste, summarisePaste } from '../pasteSummary';
import { thenFocusResult } from '../resultFocus';

interface Held {
  text: string;
  summary: string;
}

/**
 * The paste box. A paste is taken from the clipboard event and held as a string that goes to the worker as it is:
 * it is never put into the page (6 MB of cells in a text box blocked the page for seconds), a one-line summary
 * stands in for it. A few cells can still be typed into the box.
 */
export function PasteBox() {
  const { ctl, store } = useEnv();
  const id = useId();
  const box = useRef<HTMLTextAreaElement>(null);
  const [typed, setTyped] = useState('');
  const [held, setHeld] = useState<Held | null>(null);
  const [note, setNote] = useState('');
  const cells = held?.text ?? typed;

  const onPaste = (e: ClipboardEvent<HTMLTextAreaElement>) => {
    e.preventDefault();
    const text = e.clipboardData.getData('text/plain');
    if (text === '') {
      setNote('The clipboard holds no text: copy the cells in the spreadsheet first, or open the file above.');
      return;
    }
    // Where the box itself would paste: at the caret, over any selected typed text. A new paste replaces a held one.
    const t = e.currentTarget;
    const whole = held ? text : typed.slice(0, t.selectionStart) + text + typed.slice(t.selectionEnd);
    setHeld({ text: whole, summary: describePaste(summarisePaste(whole)) });
    setTyped('');
    setNote('');
  };
  const clear = () => {
    setHeld(null);
    setTyped('');
    setNote('');
    box.current?.focus();
  };
  /** Reads the cells in the worker; the data view's heading then takes focus. */
  const read = () => {
    const before = store.get().data;
    return thenFocusResult(ctl.pasteText(cells), 'data', () => {
      const now = store.get().data;
      return now !== before && now?.source.kind === 'paste';
    });
  };

  return (
    <div className="paste">
      <label htmlFor={`${id}-paste`}>Or paste cells copied from a spreadsheet (first row = column names)</label>
      <p id={`${id}-how`} className="hint">
        Click in the box and press Ctrl+V (⌘V on a Mac). Pasted cells go to the engine as they are and are not shown
        here; a few cells can also be typed, with commas between them.
      </p>
      <textarea
        id={`${id}-paste`}
        ref={box}
        rows={held ? 1 : 3}
        value={typed}
        readOnly={held !== null}
        placeholder={held ? 'Cells pasted (see below). Ctrl+V (⌘V) replaces them; Clear drops them.' : undefined}
        aria-describedby={`${id}-how ${id}-held`}
        spellCheck={false}
        onPaste={onPaste}
        onChange={(e) => {
          setTyped(e.target.value);
          setNote('');
        }}
      />
      <p id={`${id}-held`} className="paste-held" role="status" data-testid="paste-summary">
        {held ? `Pasted: ${held.summary}` : note}
      </p>
      <div className="paste-actions">
        <button
          type="button"
          className={held ? 'primary' : undefined}
          disabled={!/\S/.test(cells)}
          onClick={() => void read()}
        >
          Use pasted cells
        </button>
        <button type="button" disabled={!held && typed === ''} onClick={clear}>
          Clear
        </button>
      </div>
    </div>
  );
}
