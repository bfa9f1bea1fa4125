import { useApp, useEnv } from '../context';
import { count, pct } from '../format';
import { DataGrid } from './DataGrid';
import { FitControls } from './FitControls';
import { OpenData } from './OpenData';
import { RolesPanel } from './RolesPanel';

export function DataPanel() {
  const data = useApp((s) => s.data)!;
  return (
    <div className="panel data-panel">
      <div className="data-top">
        <div>
          {data.source.notice && (
            <p className="invented-note" data-testid="invented-note">
              {data.source.notice}
            </p>
          )}
          <p>
            {count(data.nRows)} rows × {data.columns.length} columns from <strong>{data.source.name}</strong>.
          </p>
          <OpenData compact />
        </div>
        <FitControls />
      </div>
      <RolesPanel />
      <DropReport />
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
        <strong data-testid="dropped-rows">{count(r.droppedRows)}</strong> rows (
        {pct(r.droppedRows / Math.max(1, r.nRows))}) will be left out because a value is missing
        {r.droppedRows > 0 ? ':' : '.'}
      </p>
      {r.droppedRows > 0 && (
        <ul>
          {r.byColumn
            .filter((c) => c.missing > 0)
            .map((c) => (
              <li key={c.column}>
                {c.column}: missing in {count(c.missing)} rows ({count(c.onlyThisMissing)} left out for this column
                alone)
              </li>
            ))}
        </ul>
      )}
    </section>
  );
}
