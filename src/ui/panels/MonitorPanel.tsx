import { isMonitorStale } from '../../state/monitorActions';
import { useApp, useEnv } from '../context';
import { StaleBanner } from '../StaleBanner';
import { MonitorInputs } from './MonitorInputs';
import { MonitorResults } from './MonitorResults';

/** The monitoring view: later cases observed against what the model expects, by unit and over time. */
export function MonitorPanel() {
  const { ctl } = useEnv();
  const result = useApp((s) => s.monitor.result);
  const stale = useApp(isMonitorStale);
  const busy = useApp((s) => s.jobs.length > 0);
  const withFit = useApp((s) => s.monitor.settings.model === 'current-fit');
  return (
    <div className="panel monitor-panel">
      {withFit && <StaleBanner />}
      <MonitorInputs />
      {result && stale && (
        <div className="notice warning stale-banner" role="status" data-testid="monitor-stale">
          <div>
            <strong>Out of date: </strong>
            the model, the monitoring file or the choices changed after this result was computed.
            <span className="suggestion"> Monitor again to bring it up to date.</span>
          </div>
          <div className="notice-actions">
            <button type="button" disabled={busy} onClick={() => void ctl.monitor()}>
              Monitor again
            </button>
          </div>
        </div>
      )}
      {result && <MonitorResults record={result.record} />}
    </div>
  );
}
