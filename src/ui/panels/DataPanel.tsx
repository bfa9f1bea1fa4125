import { useApp, useEnv } from '../context';
import { count, pct, plural } from '../format';
import { DataGrid } from './DataGrid';
import { FitControls } from './FitControls';
import { OpenData } from './OpenData';
import { RolesPanel } from './RolesPanel';
import { useResultFocus } from '../resultFocus';

export function DataPanel() {
  const data = useApp((s) => s.data)!;
  const heading = useResultFocus<HTMLHeadingElement>('data');
  return (
    <div className="panel data-panel">
      <div className="data-head">
        <div>
          {data.source.notice && (
            <p className="invented-note" data-testid="invented-note">
              {data.source.notice}
            </p>
          )}
          <h2 className="data-summary" ref={heading} tabIndex={-1}>
            {plural(data.nRows, 'row')} × {plural(data.columns.length, 'column')} from{' '}
            <strong>{data.source.name}</strong>.
          </h2>
          <OpenData compact />
        </div>
      </div>
      {/* Page order = tab order: the roles first, then the fitting that uses them. */}
      <RolesPanel />
      <DropReport />
      <FitControls />
      <DataGrid data={data} />
    </div>
  );
}

function DropReport() {
  const r = useApp((s) => s.dropReport);
  useEnv();
  if (!r) return null;
  return (
    <section className="drop" aria-label="Rows the model will drop">
      <p>
        <strong>{count(r.completeRows)}</strong> of {count(r.nRows)} rows are complete for this model;{' '}
        <strong data-testid="dropped-rows">{count(r.droppedRows)}</strong> {r.droppedRows === 1 ? 'row' : 'rows'} (
        {pct(r.droppedRows / Math.max(1, r.nRows))}) will be left out because a value is missing
        {r.droppedRows > 0 ? ':' : '.'}
      </p>
      {r.droppedRows > 0 && (
        <ul>
          {r.byColumn
            .filter((c) => c.missing > 0)
            .map((c) => (
              <li key={c.column}>
                {c.column}: missing in {plural(c.missing, 'row')} ({count(c.onlyThisMissing)} left out for this column
                alone)
              </li>
            ))}
        </ul>
      )}
    </section>
  );
}
