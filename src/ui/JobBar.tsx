import { useApp, useEnv } from './context';

/** Progress of running jobs, with Cancel where the job allows it. */
export function JobBar() {
  const { ctl } = useEnv();
  const jobs = useApp((s) => s.jobs);
  if (jobs.length === 0) return null;
  return (
    <section className="jobs" aria-label="Running">
      {jobs.map((j) => (
        <div key={j.id} className="job" role="status">
          <label>
            {j.label}
            {j.total > 0 ? ` — ${j.done} of ${j.total}` : '…'}
            <progress max={j.total || undefined} value={j.total ? j.done : undefined} />
          </label>
          {j.cancellable && (
            <button type="button" onClick={() => ctl.cancel(j.id)}>
              Cancel
            </button>
          )}
        </div>
      ))}
    </section>
  );
}
