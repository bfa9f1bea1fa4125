/**
 * Soft problems with the data or the fit travel as plain records in every result:
 * `code` is stable (tests assert it), `message` says what happened in plain words and names
 * the term/column/row, `suggestion` says what the user can do about it.
 */
export interface EngineWarning {
  code: string;
  message: string;
  suggestion: string;
  /** Terms or columns the warning is about, when it is about some. */
  terms?: string[];
}

export function warning(code: string, message: string, suggestion: string, terms?: string[]): EngineWarning {
  return terms && terms.length > 0 ? { code, message, suggestion, terms } : { code, message, suggestion };
}
