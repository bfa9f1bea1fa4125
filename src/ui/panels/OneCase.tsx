import { useId, useMemo, useState } from 'react';
import { useApp, useEnv } from '../context';
import { pct } from '../format';

/** A form with the model's predictors, filled with the typical case, and the predicted risk with its interval. */
export function OneCase() {
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
  const typical = () => Object.fromEntries(inputs.map(([c]) => [c, String(fit?.typical[c] ?? '')]));
  const [values, setValues] = useState<Record<string, string>>(typical);
  // A new model starts the form again from its typical case.
  const [shown, setShown] = useState(fit);
  if (shown !== fit) {
    setShown(fit);
    setValues(typical());
  }
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
