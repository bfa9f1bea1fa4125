import { useId, useState } from 'react';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { MetricsTable } from './MetricsTable';
import { PerformancePlots } from './PerformancePlots';
import { StaleBanner } from '../StaleBanner';
import { JobsHere } from '../JobBar';

export function PerformancePanel() {
  const perf = useApp((s) => s.fit?.performance ?? null);
  const validation = useApp((s) => s.validation);
  if (!perf) return <p>Fit a model to see how well it separates and how far its risks can be trusted.</p>;
  return (
    <div className="panel perf-panel">
      <StaleBanner />
      <MetricsTable perf={perf} validation={validation} />
      <Validation />
      <PerformancePlots perf={perf} />
      <Caution />
    </div>
  );
}

function Validation() {
  const { ctl } = useEnv();
  const id = useId();
  const [raw, setRaw] = useState('200');
  const b = Math.max(20, Math.min(2000, Math.round(Number(raw)) || 200));
  const status = useApp((s) => s.validationStatus);
  const layout = useApp((s) => s.fit?.layout ?? null);
  const weighted = !!layout && (layout.kind !== 'binary' || layout.weights !== null);
  return (
    <section className="validation" aria-labelledby={`${id}-h`}>
      <h3 id={`${id}-h`}>Internal validation</h3>
      <label>
        Bootstrap resamples
        <input type="number" min={20} max={2000} step={10} value={raw} onChange={(e) => setRaw(e.target.value)} />
      </label>
      <button type="button" disabled={status === 'running'} onClick={() => void ctl.validate(b)}>
        Run bootstrap validation
      </button>
      {weighted && (
        <p className="hint" data-testid="bootstrap-cases">
          Each resample draws {layout!.cases.toLocaleString('en')} cases with replacement from the cases the table
          stands for (not its {layout!.tableRowsUsed.toLocaleString('en')} rows), as if the table were written out one
          row per case.
        </p>
      )}
      <JobsHere view="performance" />
      <span role="status" data-testid="validation-status">
        {status === 'running' && ' Running: the whole fitting procedure is repeated on each resample.'}
        {status === 'cancelled' && ' Validation cancelled; apparent values only.'}
        {status === 'done' && ' Done (Efron’s optimism bootstrap). Still internal: not external validation.'}
      </span>
    </section>
  );
}
