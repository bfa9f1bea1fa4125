import { KNOT_RULE, REFERENCE_RULE } from '../../report/rules';
import { useId } from 'react';
import * as A from '../../state/actions';
import { useApp, useEnv } from '../context';
import { Interactions } from './Interactions';
import { RoleRow } from './RoleRow';

/** Outcome, event level, predictors with reference levels and spline options, interactions. */
export function RolesPanel() {
  const { ctl } = useEnv();
  const id = useId();
  const data = useApp((s) => s.data)!;
  const outcome = useApp((s) => s.outcome);
  const event = useApp((s) => s.event);
  const roles = useApp((s) => s.roles);
  const interactions = useApp((s) => s.interactions);
  const outcomeCol = data.columns.find((c) => c.name === outcome);
  const candidates = data.columns.filter((c) => c.name !== outcome);
  return (
    <section className="roles" aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Roles</h2>
      <div className="row">
        <label>
          Outcome (yes/no)
          <select
            value={outcome ?? ''}
            onChange={(e) => void ctl.act(A.changeOutcome, { column: e.target.value || null })}
          >
            <option value="">— choose —</option>
            {data.columns
              .filter((c) => c.modelling)
              .map((c) => (
                <option key={c.name} value={c.name}>
                  {c.name}
                </option>
              ))}
          </select>
        </label>
        <label>
          Counts as the event
          <select
            value={event ?? ''}
            disabled={!outcomeCol}
            onChange={(e) => void ctl.act(A.changeEvent, e.target.value || null)}
          >
            <option value="">— choose —</option>
            {(outcomeCol?.levels ?? []).map((l) => (
              <option key={l} value={l}>
                {l}
              </option>
            ))}
          </select>
        </label>
        {outcomeCol && A.outcomeHasOneValue(outcomeCol) && (
          <span className="hint" role="status" data-testid="outcome-one-value">
            {A.outcomeHasOneValue(outcomeCol)}
          </span>
        )}
        {outcomeCol && outcomeCol.levels.length > 2 && (
          <span className="hint">
            {outcomeCol.levels.length} values: rows not equal to the event count as non-events.
          </span>
        )}
      </div>
      <table className="role-table">
        <thead>
          <tr>
            <th scope="col">Predictor</th>
            <th scope="col">Type</th>
            <th scope="col">Missing</th>
            <th scope="col">Reference level</th>
            <th scope="col">Shape</th>
          </tr>
        </thead>
        <tbody>
          {candidates.map((c) => (
            <RoleRow key={c.name} col={c} nRows={data.nRows} />
          ))}
        </tbody>
      </table>
      <p className="hint">
        {REFERENCE_RULE}
        {candidates.some((c) => roles[c.name]?.include && roles[c.name].knots > 0) && ' ' + KNOT_RULE}
      </p>
      <Interactions
        columns={candidates.filter((c) => roles[c.name]?.include).map((c) => c.name)}
        pairs={interactions}
        onToggle={(p) => void ctl.act(A.changeInteraction, p)}
      />
    </section>
  );
}
