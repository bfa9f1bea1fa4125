import { useId } from 'react';
import { setMonitorSettings, monitorModelProblem } from '../../state/monitorActions';
import { useApp, useEnv } from '../context';
import { count } from '../format';
import { NumberField } from '../NumberField';
import { OpenModel } from './OpenModel';

/** What to monitor: the model (current fit or an opened model file), the file of later cases and the choices. */
export function MonitorInputs() {
  const { ctl, store } = useEnv();
  const id = useId();
  const file = useApp((s) => s.monitor.file);
  const set = useApp((s) => s.monitor.settings);
  const fit = useApp((s) => s.fit);
  const opened = useApp((s) => s.openedModel);
  const problem = useApp(monitorModelProblem);
  const busy = useApp((s) => s.jobs.length > 0);
  const change = (v: Parameters<typeof setMonitorSettings>[1]) => store.apply(setMonitorSettings, v);
  const outcome = set.model === 'model-file' ? opened?.outcome : fit?.fit.recipe.outcome;
  const event = set.model === 'model-file' ? opened?.event : fit?.fit.recipe.event;
  // Columns that can hold dates (or units) first, as the worker found them; any other column after them.
  const ranked = (first: string[]) =>
    file ? [...first, ...file.columns.map((c) => c.name).filter((n) => !first.includes(n))] : [];
  const dateOptions = ranked(file?.dateCandidates ?? []);
  const unitOptions = ranked(file?.unitCandidates ?? []).filter((n) => n !== set.dateColumn && n !== outcome);
  return (
    <section aria-labelledby={`${id}-h`} className="monitor-inputs">
      <h2 id={`${id}-h`}>Monitor later cases with the model</h2>
      <fieldset>
        <legend>Model in use</legend>
        <label className="inline">
          <input
            type="radio"
            name={`${id}-m`}
            checked={set.model === 'current-fit'}
            disabled={!fit}
            onChange={() => change({ model: 'current-fit' })}
          />
          the current fit{fit ? ` (risk of ${fit.fit.recipe.outcome} = ${fit.fit.recipe.event})` : ' (none yet)'}
        </label>
        <label className="inline">
          <input
            type="radio"
            name={`${id}-m`}
            checked={set.model === 'model-file'}
            disabled={!opened}
            onChange={() => change({ model: 'model-file' })}
          />
          the opened model file{opened ? ` “${opened.fileName}”` : ' (none opened)'}
        </label>
        <OpenModel />
        {problem && <p className="hint">{problem}</p>}
      </fieldset>
      <div className="row">
        <label className="button-like" htmlFor={`${id}-f`}>
          Choose a monitoring file
        </label>
        <input
          id={`${id}-f`}
          type="file"
          className="visually-hidden"
          data-testid="monitor-input"
          accept=".csv,.tsv,.txt,.xlsx"
          onChange={(e) => {
            const f = e.target.files?.[0];
            if (f) void ctl.openMonitoringFile(f);
            e.target.value = '';
          }}
        />
        <button type="button" disabled={busy} onClick={() => void ctl.monitoringDemo()}>
          Load the invented monitoring year (demo)
        </button>
      </div>
      {file && (
        <div className="monitor-choices">
          <p data-testid="monitor-file">
            <strong>{file.fileName}</strong>: {count(file.rows)} rows.
            {file.notice && <span className="invented"> {file.notice}</span>} Outcome (from the model):{' '}
            <strong>
              {outcome ?? '—'} = {event ?? '—'}
            </strong>
            {outcome && !file.columns.some((c) => c.name === outcome) && (
              <span className="outside-data"> This file has no column “{outcome}”.</span>
            )}
          </p>
          <div className="row">
            <label>
              Date column
              <select
                value={set.dateColumn ?? ''}
                onChange={(e) => change({ dateColumn: e.target.value || null })}
                data-testid="monitor-date"
              >
                <option value="">(choose)</option>
                {dateOptions.map((n) => (
                  <option key={n} value={n}>
                    {n}
                    {file.dateCandidates.includes(n) ? ' (dates)' : ''}
                  </option>
                ))}
              </select>
            </label>
            <label>
              Unit column (optional)
              <select
                value={set.unitColumn ?? ''}
                onChange={(e) => change({ unitColumn: e.target.value || null })}
                data-testid="monitor-unit"
              >
                <option value="">(none: no funnel plot)</option>
                {unitOptions.map((n) => (
                  <option key={n} value={n}>
                    {n}
                  </option>
                ))}
              </select>
            </label>
            <label>
              Period
              <select value={set.period} onChange={(e) => change({ period: e.target.value as 'month' | 'quarter' })}>
                <option value="month">month</option>
                <option value="quarter">quarter</option>
              </select>
            </label>
            <NumberField
              label="Target in-control ARL (cases)"
              value={set.targetArl0}
              min={10}
              step={100}
              valid={(v) => v >= 10 && v <= 1e7}
              onChange={(v) => change({ targetArl0: v })}
            />
            <label className="inline">
              <input
                type="checkbox"
                checked={set.overdispersion}
                onChange={(e) => change({ overdispersion: e.target.checked })}
              />
              Overdispersion-adjusted funnel
            </label>
          </div>
          <button
            type="button"
            className="primary"
            disabled={busy || !!problem || !set.dateColumn}
            onClick={() => void ctl.monitor()}
          >
            Monitor
          </button>
        </div>
      )}
    </section>
  );
}
