import type { Job, ViewId } from '../state/appState';
import { useApp, useEnv } from './context';

/** Jobs shown by the button that started them while its view is open (elsewhere they show in the bar). */
const PLACED: { view: ViewId; match: (j: Job) => boolean }[] = [
  { view: 'performance', match: (j) => j.id.startsWith('bootstrap-') },
];

const placedOn = (view: ViewId, j: Job): boolean => PLACED.some((p) => p.view === view && p.match(j));

/** Progress of running jobs, with Cancel where the job allows it; jobs shown by their own button are left out. */
export function JobBar() {
  const view = useApp((s) => s.view);
  const jobs = useApp((s) => s.jobs).filter((j) => !placedOn(view, j));
  if (jobs.length === 0) return null;
  return (
    <section className="jobs" aria-label="Running">
      {jobs.map((j) => (
        <JobRow key={j.id} job={j} />
      ))}
    </section>
  );
}

/** The progress and Cancel of the jobs the view `view` shows by their button (put it next to the button). */
export function JobsHere({ view }: { view: ViewId }) {
  const jobs = useApp((s) => s.jobs).filter((j) => placedOn(view, j));
  if (jobs.length === 0) return null;
  return (
    <div className="jobs jobs-here" data-testid="jobs-here">
      {jobs.map((j) => (
        <JobRow key={j.id} job={j} />
      ))}
    </div>
  );
}

function JobRow({ job: j }: { job: Job }) {
  const { ctl } = useEnv();
  return (
    <div className="job" role="status">
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
  );
}
