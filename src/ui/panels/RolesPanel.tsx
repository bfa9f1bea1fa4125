import { useEffect, useId, useState } from 'react';
import * as A from '../../state/actions';
import type { ColumnType } from '../../io/types';
import type { ColumnView } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { pct } from '../format';

/** Outcome, event level, predictors with reference levels and spline options, interactions. */
export function RolesPanel() {
  const { store, ctl } = useEnv();
  const id = useId();
  const data = useApp((s) => s.data)!;
  const outcome = useApp((s) => s.outcome);
  const event = useApp((s) => s.event);
  const roles = useApp((s) => s.roles);
  const interactions = useApp((s) => s.interactions);
  const outcomeCol = data.columns.find((c) => c.name === outcome);
  useEffect(() => {
    void ctl.refreshDropReport();
  }, [ctl, outcome, event, roles, interactions]);
  const candidates = data.columns.filter((c) => c.name !== outcome);
  return (
    <section className="roles" aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Roles</h2>
      <div className="row">
        <label>
          Outcome (yes/no)
          <select
            value={outcome ?? ''}
            onChange={(e) => store.apply(A.chooseOutcome, { column: e.target.value || null })}
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
            onChange={(e) => store.apply(A.chooseEvent, e.target.value || null)}
          >
            <option value="">— choose —</option>
            {(outcomeCol?.levels ?? []).map((l) => (
              <option key={l} value={l}>
                {l}
              </option>
            ))}
          </select>
        </label>
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
      <Interactions
        columns={candidates.filter((c) => roles[c.name]?.include).map((c) => c.name)}
        pairs={interactions}
        onToggle={(p) => store.apply(A.toggleInteraction, p)}
      />
    </section>
  );
}

const TYPES: ColumnType[] = ['numeric', 'binary', 'categorical', 'date', 'identifier', 'text'];

function RoleRow({ col, nRows }: { col: ColumnView; nRows: number }) {
  const { store, ctl } = useEnv();
  const fromFile = useApp((s) => s.data?.source.kind === 'file');
  const columnTypes = useApp((s) => s.importSettings.columnTypes);
  const role = useApp((s) => s.roles[col.name]);
  const set = (r: Parameters<typeof A.setPredictor>[1]['role']) =>
    store.apply(A.setPredictor, { column: col.name, role: r });
  const cat = col.kind === 'categorical';
  return (
    <tr className={col.modelling ? '' : 'not-modelling'}>
      <td>
        <label title={col.reason}>
          <input
            type="checkbox"
            checked={!!role?.include}
            disabled={!col.modelling}
            onChange={(e) => set({ include: e.target.checked })}
          />{' '}
          {col.name}
        </label>
      </td>
      <td title={col.reason}>
        {fromFile ? (
          <select
            aria-label={`Read ${col.name} as`}
            value={col.type}
            onChange={(e) => {
              store.apply(A.setImportSettings, {
                columnTypes: { ...columnTypes, [col.name]: e.target.value as ColumnType },
              });
              void ctl.reread();
            }}
          >
            {TYPES.map((t) => (
              <option key={t} value={t}>
                {t}
                {t === col.type && !col.modelling ? ' (not for modelling)' : ''}
              </option>
            ))}
          </select>
        ) : (
          col.type
        )}
        {fromFile && <div className="hint">{col.reason}</div>}
      </td>
      <td>{pct(col.missing / Math.max(1, nRows))}</td>
      <td>
        {cat ? (
          <select
            aria-label={`Reference level of ${col.name}`}
            value={role?.reference ?? ''}
            disabled={!role?.include}
            onChange={(e) => set({ reference: e.target.value || null })}
          >
            <option value="">most frequent</option>
            {col.levels.map((l) => (
              <option key={l} value={l}>
                {l}
              </option>
            ))}
          </select>
        ) : (
          '—'
        )}
      </td>
      <td>
        {!cat && col.type !== 'binary' ? (
          <select
            aria-label={`Shape of ${col.name}`}
            value={role?.knots ?? 0}
            disabled={!role?.include}
            onChange={(e) => set({ knots: Number(e.target.value) as 0 | 3 | 4 | 5 })}
          >
            <option value={0}>straight line (logit scale)</option>
            <option value={3}>spline, 3 knots</option>
            <option value={4}>spline, 4 knots</option>
            <option value={5}>spline, 5 knots</option>
          </select>
        ) : (
          '—'
        )}
      </td>
    </tr>
  );
}

function Interactions({
  columns,
  pairs,
  onToggle,
}: {
  columns: string[];
  pairs: [string, string][];
  onToggle: (p: [string, string]) => void;
}) {
  const [a, setA] = useState('');
  const [b, setB] = useState('');
  if (columns.length < 2) return null;
  return (
    <div className="interactions">
      <span>Interactions:</span>
      {pairs.map((p) => (
        <button
          type="button"
          key={p.join('×')}
          className="chip"
          onClick={() => onToggle(p)}
          aria-label={`Remove interaction ${p[0]} × ${p[1]}`}
        >
          {p[0]} × {p[1]} ✕
        </button>
      ))}
      <select aria-label="First term of a new interaction" value={a} onChange={(e) => setA(e.target.value)}>
        <option value="">—</option>
        {columns.map((c) => (
          <option key={c}>{c}</option>
        ))}
      </select>
      ×
      <select aria-label="Second term of a new interaction" value={b} onChange={(e) => setB(e.target.value)}>
        <option value="">—</option>
        {columns
          .filter((c) => c !== a)
          .map((c) => (
            <option key={c}>{c}</option>
          ))}
      </select>
      <button
        type="button"
        disabled={!a || !b || a === b}
        onClick={() => {
          onToggle([a, b]);
          setA('');
          setB('');
        }}
      >
        Add interaction
      </button>
    </div>
  );
}
