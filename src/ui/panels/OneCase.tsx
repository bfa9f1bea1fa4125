import { useId, useMemo, useState } from 'react';
import { useApp, useEnv } from '../context';
import { num, pct } from '../format';

/** A range end as typed data show it: whole numbers plain, others to 2 decimals. */
const plain = (x: number) => (Number.isInteger(x) ? String(x).replace('-', '−') : num(x, 2));

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
  const ranges = fit?.fit.recipe.ranges ?? {};
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
              {!levels && ranges[c] && outside(values[c], ranges[c]) && (
                <span className="outside-data" role="status" data-testid={`outside-${c}`}>
                  Outside the data the model was fitted on ({plain(ranges[c][0])} to {plain(ranges[c][1])}): the risk is
                  an extrapolation.
                </span>
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
      {score && score.outside.length > 0 && (
        <p className="outside-data" role="alert" data-testid="score-outside">
          <strong>Extrapolation: </strong>
          {score.outside
            .map((o) => `${o.column} = ${plain(o.value)} (data ${plain(o.min)} to ${plain(o.max)})`)
            .join('; ')}{' '}
          {score.outside.length === 1 ? 'lies' : 'lie'} outside the data the model was fitted on. The model has not seen
          such cases; this risk may be far off. Check the value and its units.
        </p>
      )}
    </section>
  );
}

/** True when `text` is a number outside [min, max] (blank or unreadable text is not flagged here). */
function outside(text: string | undefined, [min, max]: [number, number]): boolean {
  if (text === undefined || text.trim() === '') return false;
  const x = Number(text);
  return Number.isFinite(x) && (x < min || x > max);
}
