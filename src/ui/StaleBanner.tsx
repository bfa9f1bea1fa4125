import { isStale } from '../state/stale';
import { useApp, useEnv } from './context';

/** Says the results below belong to an earlier model, with a Refit button; shown at the top of every result view. */
export function StaleBanner() {
  const { ctl } = useEnv();
  const stale = useApp(isStale);
  const busy = useApp((s) => s.jobs.length > 0);
  if (!stale) return null;
  return (
    <div className="notice warning stale-banner" role="status" data-testid="stale-banner">
      <div>
        <strong>Out of date: </strong>
        the model settings changed after this fit, so the results below are for the previous model.
        <span className="suggestion"> Refit to bring them up to date.</span>
      </div>
      <div className="notice-actions">
        <button type="button" disabled={busy} onClick={() => void ctl.fitModel()}>
          Refit
        </button>
      </div>
    </div>
  );
}
