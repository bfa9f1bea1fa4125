import { useState } from 'react';

/** The interaction pairs as removable chips, and two pickers to add one. */
export function Interactions({
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
