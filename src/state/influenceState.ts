/**
 * Which rows drive the model (issue 20), as named actions: the diagnostics view of the current fit, the rows the
 * user ticks in it, and the odds ratios of the fit on all rows kept before a refit without the ticked rows, so the
 * two can be shown side by side. The rows left out live in the fitted request (`fit.request.leaveOut`): the model
 * file, the PDF and the warnings read them there; the data are never changed.
 */
import type { DiagnosticsView } from '../worker/diagnosticsOps';
import type { FitView, OddsRow } from '../worker/protocol';
import type { AppState } from './appState';
import type { Intent } from './actions';

export interface InfluenceState {
  /** The diagnostics of `forFit` (the view is reloaded when the shown fit is another one). */
  view: DiagnosticsView | null;
  forFit: FitView | null;
  /** Spreadsheet rows ticked in the view for "leave these rows out". */
  selected: number[];
  /** The odds ratios of the fit on all rows, kept when rows were first left out (null while none are). */
  before: {
    rowsUsed: number;
    odds: Pick<OddsRow, 'name' | 'oddsRatio' | 'waldLower' | 'waldUpper' | 'aliased'>[];
  } | null;
  /** The row the data grid scrolls to and marks (a click in the view): spreadsheet number and 0-based data index. */
  showRow: { sheetRow: number; dataRow: number } | null;
}

export const initialInfluence: InfluenceState = { view: null, forFit: null, selected: [], before: null, showRow: null };

type Perform<I> = (state: AppState, input: I) => AppState;

const withInfluence = (s: AppState, m: Partial<InfluenceState>): AppState => ({
  ...s,
  influence: { ...s.influence, ...m },
});

/** The rows the current fit left out on request ([] for a fit on all rows). */
export const leftOutOf = (fit: FitView | null): number[] => fit?.request.leaveOut ?? [];

/** The diagnostics of the shown fit arrived. */
export const influenceLoaded: Perform<{ view: DiagnosticsView; forFit: FitView }> = (s, { view, forFit }) =>
  withInfluence(s, { view, forFit, selected: s.influence.forFit === forFit ? s.influence.selected : [] });

/** A row of the view is ticked or unticked for leaving out. */
export const toggleLeaveOut: Perform<number> = (s, row) => {
  const sel = s.influence.selected;
  return withInfluence(s, {
    selected: sel.includes(row) ? sel.filter((r) => r !== row) : [...sel, row].sort((a, b) => a - b),
  });
};

/** A click on a row of the view: the data grid is shown, scrolled to that spreadsheet row. */
export const showSheetRow: Perform<{ sheetRow: number; dataRow: number }> = (s, row) => ({
  ...withInfluence(s, { showRow: row }),
  view: 'data',
});

/**
 * "What if these rows were left out?": keeps the odds ratios of the fit on all rows (unless rows are already left
 * out, whose all-rows fit is kept already) and asks for the refit; the rows join those already left out.
 */
export const refitWithoutRows: Intent<void> = {
  perform: (s) => {
    if (!s.fit || s.influence.selected.length === 0) return s;
    const before =
      leftOutOf(s.fit).length > 0 && s.influence.before
        ? s.influence.before
        : {
            rowsUsed: s.fit.rowsUsed,
            odds: s.fit.rows.map(({ name, oddsRatio, waldLower, waldUpper, aliased }) => ({
              name,
              oddsRatio,
              waldLower,
              waldUpper,
              aliased,
            })),
          };
    return withInfluence(s, { before });
  },
  follows: (_before, a) =>
    a.fit && a.influence.selected.length > 0 && a.influence.before ? ['refit-without-rows'] : [],
};

/** The rows to leave out in the refit: those left out already and the ticked ones. */
export const rowsToLeaveOut = (s: AppState): number[] =>
  [...new Set([...leftOutOf(s.fit), ...s.influence.selected])].sort((a, b) => a - b);

/** Back to all rows: the kept all-rows odds ratios are dropped with the choice. */
export const allRowsBack: Perform<void> = (s) => withInfluence(s, { before: null, selected: [] });
