import { useId } from 'react';
import { useApp, useEnv } from '../context';
import { count } from '../format';

/**
 * "Open model": reads a Fulcra model file (saved with "Save the model file (JSON)") in the worker; the opened model
 * is shown by name and used for monitoring without its development data and without a refit.
 */
export function OpenModel() {
  const { ctl } = useEnv();
  const id = useId();
  const opened = useApp((s) => s.openedModel);
  return (
    <div className="open-model" data-testid="open-model">
      <label className="button-like" htmlFor={`${id}-f`}>
        Open model
      </label>
      <input
        id={`${id}-f`}
        type="file"
        className="visually-hidden"
        data-testid="open-model-input"
        accept=".json,application/json"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.openModel(f);
          e.target.value = '';
        }}
      />{' '}
      {opened ? (
        <span data-testid="opened-model">
          Opened: <strong>{opened.fileName}</strong>, risk of {opened.outcome} = {opened.event} from{' '}
          {opened.terms.length} {opened.terms.length === 1 ? 'term' : 'terms'} ({opened.terms.join(', ')}); saved{' '}
          {opened.created.slice(0, 10)} by Fulcra {opened.fulcraVersion}
          {opened.trainedOn
            ? `; fitted on ${opened.trainedOn}${opened.trainingRows ? ` (${count(opened.trainingRows)} rows)` : ''}`
            : ''}
          .{' '}
          <button type="button" className="link" onClick={() => void ctl.closeModel()}>
            Put it away
          </button>
        </span>
      ) : (
        <span className="hint">A model file saved from Fulcra (.fulcra-model.json), to monitor new cases with it.</span>
      )}
    </div>
  );
}
