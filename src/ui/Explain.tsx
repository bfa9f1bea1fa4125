import { glossaryEntry, type GlossaryTerm } from '../report/glossary';

/**
 * A one-line plain explanation of a measure at the point of use, from the same glossary the PDF prints.
 * `tip` gives a compact marker whose text shows on hover and is read by screen readers (for table headers);
 * otherwise a short muted line, led by the term's name when `label` is set.
 */
export function Explain({ term, tip = false, label = false }: { term: GlossaryTerm; tip?: boolean; label?: boolean }) {
  const e = glossaryEntry(term);
  if (tip)
    return (
      <abbr className="explain-tip" title={e.text} data-term={term} aria-label={`${e.label}: ${e.text}`}>
        {' (?)'}
      </abbr>
    );
  return (
    <span className="hint explain" data-term={term}>
      {label && <b>{e.label}: </b>}
      {e.text}
    </span>
  );
}

/** Several explanations as one short list (under a table or plot). */
export function ExplainList({ terms }: { terms: GlossaryTerm[] }) {
  return (
    <ul className="explain-list hint">
      {terms.map((t) => (
        <li key={t}>
          <Explain term={t} label />
        </li>
      ))}
    </ul>
  );
}
