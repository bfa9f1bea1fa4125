import { ordinal } from '../format';

/** The text equivalent of a plot: a collapsible table of the plotted numbers. */
export function NumbersTable(props: {
  summary: string;
  headers: string[];
  rows: (string | number)[][];
  maxRows?: number;
}) {
  const max = props.maxRows ?? 60;
  const step = Math.max(1, Math.ceil(props.rows.length / max));
  const shown = props.rows.filter((_, i) => i % step === 0 || i === props.rows.length - 1);
  return (
    <details className="numbers">
      <summary>{props.summary}</summary>
      <table>
        <thead>
          <tr>
            {props.headers.map((h) => (
              <th key={h} scope="col">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {shown.map((r, i) => (
            <tr key={i}>
              {r.map((c, j) => (
                <td key={j}>{c}</td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      {step > 1 && (
        <p className="hint">
          Every {ordinal(step)} of {props.rows.length} points shown.
        </p>
      )}
    </details>
  );
}
