import { useId } from 'react';
import * as A from '../../state/actions';
import { isStale } from '../../state/stale';
import type { FitMethod } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { NumberField } from '../NumberField';
import { thenFocusResult } from '../resultFocus';

const METHODS: { id: FitMethod; label: string; hint: string }[] = [
  { id: 'ml', label: 'Standard (maximum likelihood)', hint: 'Odds ratios with Wald and profile-likelihood intervals.' },
  { id: 'firth', label: 'Firth (penalised likelihood)', hint: 'For small samples, rare events or separation.' },
  { id: 'ridge', label: 'Ridge', hint: 'Shrinks all coefficients; strength chosen by 10-fold cross-validation.' },
  { id: 'lasso', label: 'Lasso', hint: 'Shrinks and drops predictors; strength chosen by cross-validation.' },
  { id: 'elastic-net', label: 'Elastic net', hint: 'A mix of ridge and lasso; strength chosen by cross-validation.' },
];

const wholeIterations = (v: number) => Number.isInteger(v) && v >= 1 && v <= 10_000;

/** Fitting method, interval level, iteration limit and the Fit button. */
export function FitControls() {
  const { store, ctl } = useEnv();
  const id = useId();
  const method = useApp((s) => s.method);
  const alpha = useApp((s) => s.alpha);
  const rule = useApp((s) => s.lambdaRule);
  const level = useApp((s) => s.level);
  const maxIter = useApp((s) => s.maxIter);
  const stale = useApp(isStale);
  const busy = useApp((s) => s.jobs.length > 0);
  const penalised = method === 'ridge' || method === 'lasso' || method === 'elastic-net';
  /** Fits; the fitted model's heading then takes focus (a failed fit leaves focus on the button). */
  const fitThenFocus = () => {
    const before = store.get().fit;
    return thenFocusResult(ctl.fitModel(), 'model', () => {
      const now = store.get();
      return now.fit !== null && now.fit !== before && now.view === 'model';
    });
  };
  return (
    <section className="fit-controls" aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Fitting</h2>
      <fieldset>
        <legend>Method</legend>
        {METHODS.map((m) => (
          <label key={m.id} title={m.hint}>
            <input
              type="radio"
              name={`${id}-method`}
              value={m.id}
              checked={method === m.id}
              onChange={() => store.apply(A.chooseMethod, m.id)}
            />{' '}
            {m.label}
          </label>
        ))}
      </fieldset>
      <div className="row">
        {method === 'elastic-net' && (
          <NumberField
            label="Lasso share α (0 = ridge, 1 = lasso)"
            min={0.05}
            max={0.95}
            step={0.05}
            value={alpha}
            valid={(v) => v > 0 && v < 1}
            onChange={(v) => store.apply(A.setAlpha, v)}
          />
        )}
        {penalised && (
          <label>
            Penalty chosen by
            <select value={rule} onChange={(e) => store.apply(A.setLambdaRule, e.target.value as 'min' | '1se')}>
              <option value="1se">one-standard-error rule (simpler model)</option>
              <option value="min">lowest cross-validated deviance</option>
            </select>
          </label>
        )}
        {!penalised && (
          <label>
            Interval level
            <select value={level} onChange={(e) => store.apply(A.setLevel, Number(e.target.value))}>
              <option value={0.9}>90%</option>
              <option value={0.95}>95%</option>
              <option value={0.99}>99%</option>
            </select>
          </label>
        )}
        {(method === 'ml' || method === 'firth' || method === 'ridge') && (
          <NumberField
            label="Iteration limit"
            min={1}
            max={10000}
            step={1}
            value={maxIter}
            valid={wholeIterations}
            onChange={(v) => store.apply(A.setMaxIter, v)}
          />
        )}
      </div>
      <button type="button" className="primary" disabled={busy} onClick={() => void fitThenFocus()}>
        Fit the model
      </button>
      {stale && (
        <p className="stale" role="status">
          The settings changed since the last fit: results shown are for the previous model.
        </p>
      )}
    </section>
  );
}
