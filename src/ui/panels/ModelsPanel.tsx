import { useState } from 'react';
import * as M from '../../state/modelsState';
import { useApp, useEnv } from '../context';
import { count, num, pct } from '../format';
import { ComparisonResult } from './ComparisonResult';

/**
 * "Models & comparison": every fit of this session kept as a named model (renamable), shown again without
 * refitting, and two of them compared on the same rows (the engine's comparison record, also in the PDF).
 */
export function ModelsPanel() {
  const kept = useApp((s) => s.models.kept);
  return (
    <div className="panel models-panel" data-testid="models-panel">
      <h2>Models &amp; comparison</h2>
      <p className="hint">
        Each fit you make is kept here with its settings. Show one to make it the model every view, the PDF and the
        model file describe (no refit: the engine kept its results). A saved workspace keeps each model’s settings and
        refits them when it is opened.
      </p>
      {kept.length === 0 ? <p>Fit a model first: it appears here.</p> : <ModelList />}
      {kept.length > 0 && <ComparePicker />}
      <ComparisonResult />
    </div>
  );
}

function ModelList() {
  const { ctl, store } = useEnv();
  const { kept, shown } = useApp((s) => s.models);
  return (
    <section>
      <h3>Kept models ({kept.length})</h3>
      <table className="models-table" data-testid="kept-models">
        <thead>
          <tr>
            <th scope="col">Shown</th>
            <th scope="col">Name</th>
            <th scope="col">Method</th>
            <th scope="col">Rows used</th>
            <th scope="col">AUC</th>
            <th scope="col">Deviance</th>
            <th scope="col">
              <span className="visually-hidden">Remove</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {kept.map((k) => (
            <tr key={k.id} aria-current={k.id === shown ? 'true' : undefined} data-model-id={k.id}>
              <td>
                {k.id === shown ? (
                  <strong>shown</strong>
                ) : (
                  <button type="button" onClick={() => void ctl.showModel(k.id)}>
                    Show
                  </button>
                )}
              </td>
              <td>
                <NameField model={k} onRename={(name) => store.apply(M.renameModel, { id: k.id, name })} />
              </td>
              <td>{k.request.method ?? 'ml'}</td>
              <td className="num">{k.view ? count(k.view.rowsUsed) : 'not fitted yet'}</td>
              <td className="num">{num(k.view?.performance?.auc ?? null, 3)}</td>
              <td className="num">{num(k.view?.fit.deviance ?? null, 2)}</td>
              <td>
                <button
                  type="button"
                  aria-label={`Remove ${k.name}`}
                  onClick={() => store.apply(M.removeModel, k.id)}
                  disabled={k.id === shown}
                  title={k.id === shown ? 'Show another model before removing this one' : undefined}
                >
                  Remove
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {kept.length >= M.MAX_KEPT_MODELS && (
        <p className="hint">At most {M.MAX_KEPT_MODELS} models are kept; the next fit replaces the oldest one.</p>
      )}
    </section>
  );
}

/** The model's name, edited in place; the change is kept when the field loses focus or on Enter. */
function NameField({ model, onRename }: { model: M.KeptModel; onRename: (name: string) => void }) {
  const [text, setText] = useState<string | null>(null);
  const commit = () => {
    if (text !== null && text !== model.name) onRename(text);
    setText(null);
  };
  return (
    <input
      type="text"
      className="model-name"
      aria-label={`Name of model ${model.id}`}
      value={text ?? model.name}
      size={Math.min(60, Math.max(24, model.name.length))}
      onChange={(e) => setText(e.target.value)}
      onBlur={commit}
      onKeyDown={(e) => {
        if (e.key === 'Enter') commit();
        if (e.key === 'Escape') setText(null);
      }}
    />
  );
}

function ComparePicker() {
  const { ctl, store } = useEnv();
  const { kept, pick } = useApp((s) => s.models);
  const threshold = useApp((s) => s.threshold);
  const ready = pick.a !== null && pick.b !== null && pick.a !== pick.b;
  const select = (slot: 'a' | 'b', label: string) => (
    <label>
      {label}{' '}
      <select
        value={pick[slot] ?? ''}
        onChange={(e) =>
          store.apply(M.pickForComparison, { slot, id: e.target.value === '' ? null : Number(e.target.value) })
        }
      >
        <option value="">choose a model</option>
        {kept.map((k) => (
          <option key={k.id} value={k.id}>
            {k.name}
          </option>
        ))}
      </select>
    </label>
  );
  return (
    <section>
      <h3>Compare two models</h3>
      <p className="hint">
        Both must have been fitted on the same rows. Differences are the second model minus the first; the tables of who
        changes side use the current cut-off ({pct(threshold)}).
      </p>
      <div className="compare-picker">
        {select('a', 'First model (A)')}
        {select('b', 'Second model (B)')}
        <button type="button" disabled={!ready} onClick={() => void ctl.compareModels()}>
          Compare models
        </button>
      </div>
      {kept.length < 2 && <p className="hint">Change the predictors and fit again to have a second model.</p>}
    </section>
  );
}
