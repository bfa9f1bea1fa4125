import { useState } from 'react';

/**
 * A labelled number input that keeps what the user is typing and reports only valid numbers
 * (`valid` decides), so a field can be cleared and retyped.
 */
export function NumberField(props: {
  label: string;
  value: number;
  onChange: (v: number) => void;
  valid?: (v: number) => boolean;
  min?: number;
  max?: number;
  step?: number | 'any';
}) {
  const [text, setText] = useState(String(props.value));
  // A new value from outside replaces the text unless the text already says it ("0.50" for 0.5 stays).
  const [shown, setShown] = useState(props.value);
  if (!Object.is(shown, props.value)) {
    setShown(props.value);
    if (Number(text) !== props.value) setText(String(props.value));
  }
  const valid = props.valid ?? Number.isFinite;
  const bad = text.trim() === '' || !valid(Number(text));
  return (
    <label>
      {props.label}
      <input
        type="number"
        min={props.min}
        max={props.max}
        step={props.step ?? 'any'}
        value={text}
        aria-invalid={bad}
        onChange={(e) => {
          setText(e.target.value);
          const v = Number(e.target.value);
          if (e.target.value.trim() !== '' && valid(v)) props.onChange(v);
        }}
      />
    </label>
  );
}
