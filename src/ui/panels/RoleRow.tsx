import * as A from '../../state/actions';
import type { ColumnType } from '../../io/types';
import type { ColumnView } from '../../worker/protocol';
import { useApp, useEnv } from '../context';
import { pct } from '../format';

const TYPES: ColumnType[] = ['numeric', 'binary', 'categorical', 'date', 'identifier', 'text'];

/** One predictor: include it, how to read its column, its reference level and its shape. */
export function RoleRow({ col, nRows }: { col: ColumnView; nRows: number }) {
  const { ctl } = useEnv();
  // A file's or pasted cells' columns can be read as another type (demos are generated, not read).
  const fromFile = useApp((s) => s.data?.source.kind === 'file' || s.data?.source.kind === 'paste');
  const role = useApp((s) => s.roles[col.name]);
  const set = (r: Parameters<typeof A.setPredictor>[1]['role']) =>
    void ctl.act(A.changeRole, { column: col.name, role: r });
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
            onChange={(e) => void ctl.act(A.readColumnAs, { column: col.name, type: e.target.value as ColumnType })}
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
            <option value="">default</option>
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
