import { dismiss } from '../state/actions';
import type { Notice } from '../state/appState';
import { useApp, useEnv } from './context';
import { saveWorkspaceFile } from './saveWorkspace';

const REMEDY_LABEL: Record<NonNullable<Notice['action']>, string> = {
  'use-firth': 'Refit with Firth’s penalised likelihood',
  'use-ridge': 'Refit with a ridge penalty',
  reload: 'Go to the data view',
  'start-afresh': 'Start afresh',
  refit: 'Refit the model',
  'save-workspace': 'Save workspace as a file',
};

/** The one place where errors and warnings are shown, each with its suggested action. */
export function NoticeArea() {
  const { store, ctl } = useEnv();
  const notices = useApp((s) => s.notices);
  if (notices.length === 0) return null;
  return (
    <section className="notices" aria-label="Messages" aria-live="polite">
      {notices.map((n) => (
        <div
          key={n.id}
          className={`notice ${n.kind}`}
          role={n.kind === 'error' ? 'alert' : 'status'}
          data-code={n.code}
        >
          <div>
            <strong>{n.kind === 'error' ? 'Problem: ' : n.kind === 'warning' ? 'Check: ' : ''}</strong>
            {n.text}
            {n.suggestion && <span className="suggestion"> {n.suggestion}</span>}
          </div>
          <div className="notice-actions">
            {n.action && (
              <button
                type="button"
                onClick={() =>
                  // Saving the file keeps the notice: it still says what this browser could not keep.
                  void (n.action === 'save-workspace' ? saveWorkspaceFile(store, ctl) : ctl.useRemedy(n.action!, n.id))
                }
              >
                {REMEDY_LABEL[n.action]}
              </button>
            )}
            <button type="button" aria-label={`Dismiss: ${n.text}`} onClick={() => store.apply(dismiss, n.id)}>
              Dismiss
            </button>
          </div>
        </div>
      ))}
    </section>
  );
}
