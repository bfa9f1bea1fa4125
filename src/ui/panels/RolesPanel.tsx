import { countsColumn, type OutcomeLayout } from '../../engine/core';
import { KNOT_RULE, REFERENCE_RULE } from '../../report/rules';
import { useId } from 'react';
import * as A from '../../state/actions';
import { useApp, useEnv } from '../context';
import { Interactions } from './Interactions';
import { RoleRow } from './RoleRow';

/** The names of `columns` other than the ones already taking another role. */
function names(columns: { name: string }[], ...taken: (string | null)[]): string[] {
  return columns.filter((c) => !taken.includes(c.name)).map((c) => c.name);
}

/** A list of names to choose one from, with an empty first entry (`none`) that chooses nothing (null). */
function ChoiceSelect(props: {
  value: string | null;
  choices: string[];
  onChoose: (value: string | null) => void;
  none?: string;
  testId?: string;
  disabled?: boolean;
}) {
  return (
    <select
      value={props.value ?? ''}
      data-testid={props.testId}
      disabled={props.disabled}
      onChange={(e) => props.onChoose(e.target.value || null)}
    >
      <option value="">{props.none ?? '— choose —'}</option>
      {props.choices.map((name) => (
        <option key={name} value={name}>
          {name}
        </option>
      ))}
    </select>
  );
}

/** The layout for a choice in the layout list, keeping the count column already chosen. */
function layoutOf(kind: string, counts: string | null): OutcomeLayout {
  if (kind === 'events-trials') return { kind, trials: counts ?? '' };
  if (kind === 'events-nonevents') return { kind, nonEvents: counts ?? '' };
  return { kind: 'binary' };
}

/** Outcome layout, outcome or counts, event, weights, predictors with reference levels and splines, interactions. */
export function RolesPanel() {
  const { ctl } = useEnv();
  const id = useId();
  const data = useApp((s) => s.data)!;
  const outcome = useApp((s) => s.outcome);
  const event = useApp((s) => s.event);
  const roles = useApp((s) => s.roles);
  const interactions = useApp((s) => s.interactions);
  const layout = useApp((s) => s.layout);
  const weights = useApp((s) => s.weights);
  const outcomeCol = data.columns.find((c) => c.name === outcome);
  const counts = countsColumn(layout);
  const grouped = layout.kind !== 'binary';
  const roleColumns = new Set([outcome, counts, weights]);
  const candidates = data.columns.filter((c) => !roleColumns.has(c.name));
  const numeric = data.columns.filter((c) => c.kind === 'numeric' && c.modelling);
  const countWord = layout.kind === 'events-trials' ? 'Trials' : 'Non-events';
  return (
    <section className="roles" aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Roles</h2>
      <div className="row">
        <label>
          Outcome layout
          <select
            value={layout.kind}
            data-testid="outcome-layout"
            onChange={(e) => void ctl.act(A.changeLayout, layoutOf(e.target.value, counts))}
          >
            <option value="binary">one yes/no value per row</option>
            <option value="events-trials">counts: events and trials per row</option>
            <option value="events-nonevents">counts: events and non-events per row</option>
          </select>
        </label>
        <label>
          Case weights
          <ChoiceSelect
            value={weights}
            testId="case-weights"
            none="none: one case per row"
            choices={names(numeric, outcome, counts)}
            onChoose={(v) => void ctl.act(A.changeWeights, v)}
          />
        </label>
      </div>
      {grouped ? (
        <div className="row">
          <label>
            Events (count)
            <ChoiceSelect
              value={outcome}
              testId="events-column"
              choices={names(numeric, counts, weights)}
              onChoose={(v) => void ctl.act(A.changeOutcome, { column: v })}
            />
          </label>
          <label>
            {countWord} (count)
            <ChoiceSelect
              value={counts || null}
              testId="counts-column"
              choices={names(numeric, outcome, weights)}
              onChoose={(v) => void ctl.act(A.changeLayout, layoutOf(layout.kind, v))}
            />
          </label>
          <span className="hint">
            Each row stands for its {layout.kind === 'events-trials' ? 'trials' : 'events and non-events'}
            {weights ? `, times its weight in "${weights}"` : ''}: counts, measures and the bootstrap are per case, as
            if the table were written out one row per case. Every row is checked when the model is fitted (whole counts,
            none negative{layout.kind === 'events-trials' ? ', events no more than trials' : ''}).
          </span>
        </div>
      ) : (
        <div className="row">
          <label>
            Outcome (yes/no)
            <ChoiceSelect
              value={outcome}
              choices={data.columns.filter((c) => c.modelling).map((c) => c.name)}
              onChoose={(v) => void ctl.act(A.changeOutcome, { column: v })}
            />
          </label>
          <label>
            Counts as the event
            <ChoiceSelect
              value={event}
              disabled={!outcomeCol}
              choices={outcomeCol?.levels ?? []}
              onChoose={(v) => void ctl.act(A.changeEvent, v)}
            />
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
          {weights && (
            <span className="hint">
              Each row stands for as many identical cases as its weight in "{weights}" (whole numbers of at least 1).
            </span>
          )}
        </div>
      )}
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
