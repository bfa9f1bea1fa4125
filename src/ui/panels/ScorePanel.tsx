import { useEffect, useId, useMemo, useState } from 'react';
import { Caution } from '../Caution';
import { useApp, useEnv } from '../context';
import { count, num, pct } from '../format';
import { ExportReport } from './ExportReport';
import { PerformancePlots } from './PerformancePanel';

export function ScorePanel() {
  return (
    <div className="panel score-panel">
      <div className="cols">
        <OneCase />
        <div>
          <BatchScore />
          <External />
        </div>
      </div>
      <ExportReport />
      <Caution external />
    </div>
  );
}

function OneCase() {
  const { ctl } = useEnv();
  const id = useId();
  const fit = useApp((s) => s.fit);
  const data = useApp((s) => s.data);
  const score = useApp((s) => s.score);
  const t = useApp((s) => s.threshold);
  const inputs = useMemo(() => {
    const cols = new Map<string, string[] | null>();
    for (const term of fit?.fit.recipe.terms ?? []) {
      if (term.type === 'categorical') cols.set(term.column, term.levels);
      else if (term.type !== 'interaction') cols.set(term.column, null);
    }
    return [...cols.entries()];
  }, [fit]);
  const [values, setValues] = useState<Record<string, string>>({});
  useEffect(() => {
    const init: Record<string, string> = {};
    for (const [c] of inputs) init[c] = String(fit?.typical[c] ?? '');
    setValues(init);
  }, [inputs, fit]);
  const submit = () => {
    const rec: Record<string, string | number | null> = {};
    for (const [c, levels] of inputs) rec[c] = values[c] === '' ? null : levels ? values[c] : Number(values[c]);
    void ctl.scoreOne(rec);
  };
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Score one case</h2>
      <form
        className="case-form"
        onSubmit={(e) => {
          e.preventDefault();
          submit();
        }}
      >
        {inputs.map(([c, levels]) => {
          const col = data?.columns.find((x) => x.name === c);
          return (
            <label key={c}>
              {c}
              {levels ? (
                <select value={values[c] ?? ''} onChange={(e) => setValues({ ...values, [c]: e.target.value })}>
                  {levels.map((l) => (
                    <option key={l}>{l}</option>
                  ))}
                </select>
              ) : (
                <input
                  type="number"
                  step="any"
                  required
                  value={values[c] ?? ''}
                  onChange={(e) => setValues({ ...values, [c]: e.target.value })}
                  placeholder={col?.median !== null && col?.median !== undefined ? `typical ${col.median}` : undefined}
                />
              )}
            </label>
          );
        })}
        <button type="submit" className="primary">
          Predict the risk
        </button>
      </form>
      {score && (
        <p className="score-result" data-testid="score-result" role="status">
          Predicted risk <strong>{pct(score.risk)}</strong> ({Math.round((fit?.fit.level ?? 0.95) * 100)}% CI{' '}
          {pct(score.lower)} to {pct(score.upper)}): <strong>{score.flagged ? 'flagged' : 'not flagged'}</strong> at the
          cut-off of {pct(score.threshold)}
          {score.threshold !== t ? ` (the cut-off is now ${pct(t)}; predict again to update)` : ''}.
        </p>
      )}
    </section>
  );
}

function BatchScore() {
  const { ctl } = useEnv();
  const id = useId();
  const batch = useApp((s) => s.batch);
  const url = useMemo(() => (batch ? URL.createObjectURL(new Blob([batch.csv], { type: 'text/csv' })) : null), [batch]);
  useEffect(
    () => () => {
      if (url) URL.revokeObjectURL(url);
    },
    [url],
  );
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Score a file of new cases</h2>
      <label className="button-like" htmlFor={`${id}-f`}>
        Choose a file to score
      </label>
      <input
        id={`${id}-f`}
        type="file"
        className="visually-hidden"
        data-testid="batch-input"
        accept=".csv,.tsv,.txt,.xlsx"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.scoreBatch(f);
          e.target.value = '';
        }}
      />
      {batch && (
        <div data-testid="batch-result">
          <p>
            {count(batch.scored)} of {count(batch.n)} rows scored
            {batch.skipped ? `; ${count(batch.skipped)} skipped for missing or unknown values` : ''}.
          </p>
          {url && (
            <a href={url} download="scored-cases.csv">
              Download the scored rows (CSV)
            </a>
          )}
          <table>
            <caption>First {Math.min(8, batch.preview.length)} scored rows</caption>
            <thead>
              <tr>
                <th scope="col">Spreadsheet row</th>
                <th scope="col">Risk</th>
                <th scope="col">CI</th>
              </tr>
            </thead>
            <tbody>
              {batch.preview.slice(0, 8).map((r) => (
                <tr key={r.row}>
                  <td>{r.row}</td>
                  <td className="num">{pct(r.risk)}</td>
                  <td className="num">
                    {pct(r.lower)} to {pct(r.upper)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

function External() {
  const { ctl } = useEnv();
  const id = useId();
  const ext = useApp((s) => s.external);
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Check the model on a new file (external validation)</h2>
      <label className="button-like" htmlFor={`${id}-f`}>
        Choose a file with known outcomes
      </label>
      <input
        id={`${id}-f`}
        type="file"
        className="visually-hidden"
        accept=".csv,.tsv,.txt,.xlsx"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.externalValidate(f);
          e.target.value = '';
        }}
      />
      {ext && (
        <div data-testid="external-result">
          <p>
            {count(ext.n)} cases. AUC {num(ext.performance.auc, 3)} ({num(ext.performance.aucLower, 3)} to{' '}
            {num(ext.performance.aucUpper, 3)}), calibration slope {num(ext.performance.calSlope, 3)},
            calibration-in-the-large {num(ext.performance.calInLarge, 3)}, Brier {num(ext.performance.brier, 4)}.
          </p>
          {ext.recalibration && (
            <p>
              Recalibrated for this setting: new intercept {num(ext.recalibration.intercept, 3)}, slope{' '}
              {num(ext.recalibration.slope, 3)} on the linear predictor.
            </p>
          )}
          <PerformancePlots perf={ext.performance} />
        </div>
      )}
    </section>
  );
}
