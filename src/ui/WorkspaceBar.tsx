import { useRef, useState } from 'react';
import { useApp, useEnv } from './context';
import { saveWorkspaceFile } from './saveWorkspace';

/** Save the whole workspace as one file, open one, and see when the work was last kept in this browser. */
export function WorkspaceBar() {
  const { store, ctl } = useEnv();
  const input = useRef<HTMLInputElement>(null);
  const hasData = useApp((s) => s.data !== null);
  const savedAt = useApp((s) => s.savedAt);
  const [confirming, setConfirming] = useState(false);
  /** Set when the confirmation is cancelled: focus goes back to "Start afresh…". */
  const refocus = useRef(false);
  const keepWork = () => {
    refocus.current = true;
    setConfirming(false);
  };
  const save = () => saveWorkspaceFile(store, ctl);
  return (
    <div className="workspace-bar" role="group" aria-label="Workspace">
      {savedAt && (
        <span
          className="hint"
          data-testid="autosaved"
          title="Kept in this browser's storage on this computer; restored when you come back."
        >
          Kept here {new Date(savedAt).toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' })}
        </span>
      )}
      <button type="button" disabled={!hasData} onClick={() => void save()}>
        Save workspace as a file
      </button>
      <button type="button" onClick={() => input.current?.click()}>
        Open a workspace file
      </button>
      {hasData && !confirming && (
        <button
          type="button"
          ref={(el) => {
            if (el && refocus.current) {
              refocus.current = false;
              el.focus();
            }
          }}
          onClick={() => setConfirming(true)}
        >
          Start afresh…
        </button>
      )}
      {hasData && confirming && (
        <span
          role="group"
          aria-label="Start afresh?"
          onKeyDown={(e) => {
            if (e.key === 'Escape') {
              e.preventDefault();
              keepWork();
            }
          }}
        >
          <span className="hint">Forget the data and all settings? </span>
          {/* The safe choice has the focus: Enter or Escape keeps the work. */}
          <button
            type="button"
            onClick={() => {
              setConfirming(false);
              ctl.startAfresh();
            }}
          >
            Yes, start afresh
          </button>{' '}
          <button type="button" autoFocus onClick={keepWork}>
            Keep my work
          </button>
        </span>
      )}
      <input
        ref={input}
        type="file"
        data-testid="workspace-input"
        accept=".json,.gz,application/json,application/gzip"
        className="visually-hidden"
        tabIndex={-1}
        aria-hidden="true"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.openWorkspaceFile(f);
          e.target.value = '';
        }}
      />
    </div>
  );
}
