import { useId, useState } from 'react';
import { num } from '../format';

/** Why a typed cost is refused, or null when it is a number above 0. */
export function costProblem(text: string): string | null {
  if (text.trim() === '') return 'Enter a cost.';
  const v = Number(text);
  if (!Number.isFinite(v)) return 'Enter a number.';
  if (v <= 0) return 'A cost must be above 0.';
  return null;
}

/**
 * A cost box that passes on only numbers above 0. Anything else (0, −5, empty, not a number) is refused beside
 * the box, marked invalid, and the cost in force stays the last valid one.
 */
export function CostInput(props: {
  label: string;
  value: number;
  onChange: (v: number) => void;
  onValidity?: (ok: boolean) => void;
}) {
  const id = useId();
  const [text, setText] = useState(String(props.value));
  const [shown, setShown] = useState(props.value);
  if (!Object.is(shown, props.value)) {
    setShown(props.value);
    if (Number(text) !== props.value) setText(String(props.value));
  }
  const problem = costProblem(text);
  return (
    <label className="cost-input">
      {props.label}
      <input
        type="number"
        min={0}
        step="any"
        value={text}
        aria-invalid={problem !== null}
        aria-describedby={problem ? `${id}-err` : undefined}
        onChange={(e) => {
          const t = e.target.value;
          setText(t);
          const bad = costProblem(t);
          props.onValidity?.(bad === null);
          if (bad === null) props.onChange(Number(t));
        }}
      />
      {problem && (
        <span className="field-error" id={`${id}-err`} role="alert">
          {problem} The cost in force stays {num(props.value, 2).replace(/\.?0+$/, '')}.
        </span>
      )}
    </label>
  );
}
