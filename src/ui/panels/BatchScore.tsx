import { useEffect, useId, useMemo } from 'react';
import { useApp, useEnv } from '../context';
import { count, pct, plural } from '../format';

/** Scores a file of new cases; the scored rows download as CSV. */
export function BatchScore() {
  const { ctl } = useEnv();
  const id = useId();
  const batch = useApp((s) => s.batch);
  const url = useMemo(
    () => (batch ? URL.createObjectURL(new Blob(batch.csvParts, { type: 'text/csv' })) : null),
    [batch],
  );
  useEffect(
    () => () => {
      if (url) URL.revokeObjectURL(url);
    },
    [url],
  );
  return (
    <section aria-labelledby={`${id}-h`}>
      <h2 id={`${id}-h`}>Score a file of new cases</h2>
      <label className="button-like" htmlFor={`${id}-f`}>
        Choose a file to score
      </label>
      <input
        id={`${id}-f`}
        type="file"
        className="visually-hidden"
        data-testid="batch-input"
        accept=".csv,.tsv,.txt,.xlsx"
        onChange={(e) => {
          const f = e.target.files?.[0];
          if (f) void ctl.scoreBatch(f);
          e.target.value = '';
        }}
      />
      {batch && (
        <div data-testid="batch-result">
          <p>
            {count(batch.scored)} of {plural(batch.n, 'row')} scored
            {batch.skipped ? `; ${count(batch.skipped)} skipped for missing or unknown values` : ''}.
            {batch.expectedEvents != null && (
              <span data-testid="expected-events">
                {' '}
                Expected events in the scored rows: {batch.expectedEvents.toFixed(1)} (each row&apos;s trials × its
                risk; the CSV lists them per row).
              </span>
            )}
          </p>
          {batch.unknownRows > 0 && (
            <p className="outside-data" data-testid="batch-unknown">
              <strong>Not scored, unknown category: </strong>
              {batch.unknownFirst.map((u) => `row ${u.row}, ${u.column} = “${u.value}”`).join('; ')}
              {batch.unknownRows > batch.unknownFirst.length
                ? `; and ${count(batch.unknownRows - batch.unknownFirst.length)} more rows`
                : ''}
              . The model was not fitted with these categories.
            </p>
          )}
          {batch.outsideRows > 0 && (
            <p className="outside-data" data-testid="batch-outside">
              <strong>Extrapolation: </strong>
              {count(batch.outsideRows)} scored {batch.outsideRows === 1 ? 'row has' : 'rows have'} a value outside the
              data the model was fitted on (
              {batch.outsideFirst.map((o) => `row ${o.row}: ${o.columns.join(', ')}`).join('; ')}
              {batch.outsideRows > batch.outsideFirst.length ? '; …' : ''}). Their risks may be far off; the column
              outside_data of the scored file names the columns for every row.
            </p>
          )}
          {url && (
            <a href={url} download="scored-cases.csv">
              Download the scored rows (CSV)
            </a>
          )}
          <table>
            <caption>First {Math.min(8, batch.preview.length)} scored rows</caption>
            <thead>
              <tr>
                <th scope="col">Spreadsheet row</th>
                <th scope="col">Risk</th>
                <th scope="col">CI</th>
              </tr>
            </thead>
            <tbody>
              {batch.preview.slice(0, 8).map((r) => (
                <tr key={r.row}>
                  <td>{r.row}</td>
                  <td className="num">{pct(r.risk)}</td>
                  <td className="num">
                    {pct(r.lower)} to {pct(r.upper)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
