import { plural } from '../core/wording';
import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import type { DesignRecipe, ModelSpec } from '../core/model';
import { absenceLevel, parseDecimal } from './levels';
import { rcsBasis, rcsKnots } from './splines';
import { warning, type EngineWarning } from '../core/warnings';
import { allocDesign, allocF64 } from '../numerics/rowPool';

export interface EncodedDesign {
  /** Column-major n×p, intercept first. */
  X: Float64Array;
  n: number;
  p: number;
  columnNames: string[];
  /** Term name per design column ("(Intercept)" for the first). */
  columnTerms: string[];
  /** Design-column indices of each term, in recipe order (the intercept is not a term). */
  termColumns: { name: string; columns: number[] }[];
  /** Indices of the input rows that were used (complete cases). */
  rowsUsed: Int32Array;
  /** 0/1 outcome per used row; null when the data has no outcome column. */
  y: Float64Array | null;
  /**
   * Frequency weight per used row (cases the row stands for) when the recipe has a weights column and the outcome is
   * read; null otherwise (one case per row).
   */
  weights: Float64Array | null;
  nDropped: number;
  droppedByColumn: Record<string, number>;
}

export interface Design extends EncodedDesign {
  y: Float64Array;
  recipe: DesignRecipe;
  warnings: EngineWarning[];
}

type RecipeTerm = DesignRecipe['terms'][number];
type Getter = (row: number) => number;

const INTERCEPT = '(Intercept)';

function columnsOfTerm(t: RecipeTerm): string[] {
  return t.type === 'interaction' ? [...t.parts] : [t.column];
}

export { parseDecimal };

/** Reads a column as numbers (categorical levels are parsed as decimals) or throws naming the column. */
function numericGetter(col: Column): Getter {
  if (col.kind === 'numeric') return (r) => col.values[r];
  const parsed = col.levels.map(parseDecimal);
  const bad = col.levels.findIndex((_, i) => Number.isNaN(parsed[i]));
  if (bad >= 0)
    throw new FulcraError(
      'not-numeric',
      `Column "${col.name}" must be numeric but has the value "${col.levels[bad]}".`,
    );
  return (r) => (col.codes[r] < 0 ? NaN : parsed[col.codes[r]]);
}

/** 1 where the column's value is missing, for every row of the dataset. */
/**
 * Complete cases of `cols` among `candidate` (every row when null), counting per column (in `cols` order) the
 * candidate rows it leaves out. One scan per column; the per-row mask is made only once a value is missing, so data
 * without missing values cost one read of each column. `identity`: the rows are 0 … nRows − 1 in order.
 */
function completeRows(cols: Column[], nRows: number, candidate: Int32Array | null) {
  const droppedByColumn: Record<string, number> = {};
  let missing: Uint8Array | null = null;
  const m = candidate ? candidate.length : nRows;
  for (const c of cols) {
    let k = 0;
    if (c.kind === 'numeric') {
      const v = c.values;
      for (let i = 0; i < m; i++) {
        const r = candidate ? candidate[i] : i;
        if (v[r] !== v[r]) {
          k++;
          (missing ??= new Uint8Array(nRows))[r] = 1;
        }
      }
    } else {
      const codes = c.codes;
      for (let i = 0; i < m; i++) {
        const r = candidate ? candidate[i] : i;
        if (codes[r] < 0) {
          k++;
          (missing ??= new Uint8Array(nRows))[r] = 1;
        }
      }
    }
    if (k > 0) droppedByColumn[c.name] = (droppedByColumn[c.name] ?? 0) + k;
  }
  let rowsUsed: Int32Array;
  if (!missing) {
    rowsUsed = candidate ? candidate.slice() : new Int32Array(nRows);
    if (!candidate) for (let i = 0; i < nRows; i++) rowsUsed[i] = i;
  } else {
    let n = 0;
    for (let i = 0; i < m; i++) if (!missing[candidate ? candidate[i] : i]) n++;
    rowsUsed = new Int32Array(n);
    for (let i = 0, k = 0; i < m; i++) {
      const r = candidate ? candidate[i] : i;
      if (!missing[r]) rowsUsed[k++] = r;
    }
  }
  return { rowsUsed, droppedByColumn, nDropped: m - rowsUsed.length, identity: !candidate && !missing };
}

/** Level string per row (numbers are written as strings), null when missing. */
function levelGetter(col: Column): (row: number) => string | null {
  if (col.kind === 'categorical') return (r) => (col.codes[r] < 0 ? null : col.levels[col.codes[r]]);
  return (r) => (Number.isNaN(col.values[r]) ? null : String(col.values[r]));
}

/** Per-part encoder of an interaction: the part's main-effect columns. */
function partEncoding(recipe: DesignRecipe, part: string): { names: string[]; levels?: string[]; reference?: string } {
  const t = recipe.terms.find((u) => u.type !== 'interaction' && u.column === part);
  if (t && t.type === 'categorical') {
    return {
      names: t.levels.filter((l) => l !== t.reference).map((l) => `${part}=${l}`),
      levels: t.levels,
      reference: t.reference,
    };
  }
  return { names: [part] };
}

type RecipeOptions = {
  rows?: Int32Array;
  outcome?: 'if-present' | 'ignore';
  /**
   * The caller has checked that every row of `rows` has a value in every column the recipe reads (outcome and
   * weights included): the missing-value scan is skipped and `rows` are used as they are.
   */
  complete?: boolean;
  /**
   * Storage to write the design into when it is large enough (a caller encoding block after block reuses one
   * buffer instead of touching fresh memory each time); X is then a view of it.
   */
  scratch?: Float64Array;
};

/** The rows a recipe uses on `data` (complete cases among `opts.rows`) and the columns it reads. */
interface RecipeRows {
  cols: Map<string, Column>;
  outcomeCol: Column | null;
  weightsCol: Column | null;
  rowsUsed: Int32Array;
  n: number;
  nDropped: number;
  droppedByColumn: Record<string, number>;
  /** rowsUsed is 0 … nRows − 1 in order: a numeric column is copied as a block. */
  identity: boolean;
}

function recipeRows(recipe: DesignRecipe, data: Dataset, opts: RecipeOptions): RecipeRows {
  const { rows, outcome = 'if-present' } = opts;
  const used = new Set<string>();
  for (const t of recipe.terms) for (const c of columnsOfTerm(t)) used.add(c);
  const hasOutcome = outcome === 'if-present' && data.columns.some((c) => c.name === recipe.outcome);
  const cols = new Map<string, Column>();
  for (const name of used) cols.set(name, getColumn(data, name));
  const outcomeCol = hasOutcome ? getColumn(data, recipe.outcome) : null;
  // Weights are read with the outcome, when the data have the column (a validation file may hold one case per row).
  const weightsCol =
    outcomeCol && recipe.weights && data.columns.some((c) => c.name === recipe.weights)
      ? getColumn(data, recipe.weights)
      : null;
  if (opts.complete && rows)
    return {
      cols,
      outcomeCol,
      weightsCol,
      rowsUsed: rows,
      n: rows.length,
      nDropped: 0,
      droppedByColumn: {},
      identity: false,
    };
  const checked = [...(outcomeCol ? [outcomeCol] : []), ...(weightsCol ? [weightsCol] : []), ...cols.values()];
  const sel = completeRows(checked, data.nRows, rows ?? null);
  return { cols, outcomeCol, weightsCol, ...sel, n: sel.rowsUsed.length };
}

/** Number of design columns of a recipe, intercept included. */
function recipeWidth(recipe: DesignRecipe): number {
  const width = (t: RecipeTerm, part?: string): number => {
    if (t.type === 'interaction' && !part) return width(t, t.parts[0]) * width(t, t.parts[1]);
    const enc = part ? partEncoding(recipe, part) : null;
    if (t.type === 'categorical') return t.levels.length - 1;
    if (enc?.levels) return enc.levels.length - 1;
    return t.type === 'spline' && !part ? t.knots.length - 1 : 1;
  };
  return 1 + recipe.terms.reduce((a, t) => a + width(t), 0);
}

type EncodedColumn = { name: string; values: Float64Array };

/**
 * The per-term column encoder shared by the design and the linear predictor: the columns of one term (indicators
 * against the reference, the value, its spline basis, or products of the parts' columns) for the used rows,
 * written into columns from `alloc` (which must hand out zeroed columns). Throws naming the spreadsheet row of an
 * unseen level.
 */
function termEncoder(recipe: DesignRecipe, data: Dataset, sel: RecipeRows) {
  const { cols, rowsUsed, n } = sel;
  const scratch = (): Float64Array => new Float64Array(n);
  const encodeMain = (t: RecipeTerm, part: string | undefined, alloc: () => Float64Array): EncodedColumn[] => {
    const column = part ?? (t as { column: string }).column;
    const col = cols.get(column)!;
    const enc = part ? partEncoding(recipe, part) : null;
    const levels = t.type === 'categorical' ? t.levels : enc?.levels;
    const reference = t.type === 'categorical' ? t.reference : enc?.reference;
    if (levels && reference !== undefined) {
      const get = levelGetter(col);
      const others = levels.filter((l) => l !== reference);
      const out = others.map((l) => ({ name: `${column}=${l}`, values: alloc() }));
      // per level code: index among `others`, −1 for the reference, −2 for a level the model has not seen
      const slot = (l: string) => (l === reference ? -1 : others.includes(l) ? others.indexOf(l) : -2);
      const codes = col.kind === 'categorical' ? col.codes : null;
      const codeMap = col.kind === 'categorical' ? col.levels.map(slot) : [];
      for (let i = 0; i < n; i++) {
        const k = codes ? codeMap[codes[rowsUsed[i]]] : slot(get(rowsUsed[i])!);
        if (k >= 0) out[k].values[i] = 1;
        else if (k === -2) {
          throw new FulcraError(
            'unseen-level',
            `Row ${sheetRow(data, rowsUsed[i])}, column "${column}": the value "${get(rowsUsed[i])}" was not seen ` +
              `when the model was fitted (known: ${levels.join(', ')}).`,
            'Recode the value to one of the known levels or remove the row.',
          );
        }
      }
      return out;
    }
    const x = alloc();
    if (col.kind === 'numeric' && sel.identity) x.set(col.values.subarray(0, n));
    else if (col.kind === 'numeric') {
      const v = col.values;
      for (let i = 0; i < n; i++) x[i] = v[rowsUsed[i]];
    } else {
      const get = numericGetter(col);
      for (let i = 0; i < n; i++) x[i] = get(rowsUsed[i]);
    }
    if (t.type !== 'spline' || part) return [{ name: column, values: x }];
    const k = t.knots.length;
    const basis = Array.from({ length: k - 2 }, (_, j) => ({ name: column + "'".repeat(j + 1), values: alloc() }));
    const tmp = new Float64Array(k - 2);
    for (let i = 0; i < n; i++) {
      rcsBasis(x[i], t.knots, tmp);
      for (let j = 0; j < k - 2; j++) basis[j].values[i] = tmp[j];
    }
    return [{ name: column, values: x }, ...basis];
  };
  return (t: RecipeTerm, alloc: () => Float64Array): EncodedColumn[] => {
    if (t.type !== 'interaction') return encodeMain(t, undefined, alloc);
    const a = encodeMain(t, t.parts[0], scratch),
      b = encodeMain(t, t.parts[1], scratch);
    const cs: EncodedColumn[] = [];
    for (const ca of a) {
      for (const cb of b) {
        const v = alloc();
        for (let i = 0; i < n; i++) v[i] = ca.values[i] * cb.values[i];
        cs.push({ name: `${ca.name}:${cb.name}`, values: v });
      }
    }
    return cs;
  };
}

/** Null when every value is finite, else the error naming the first non-finite one (by spreadsheet row). */
function overflowError(data: Dataset, sel: RecipeRows, name: string, term: string, v: Float64Array) {
  let probe = 0;
  for (let i = 0; i < sel.n; i++) probe += v[i] * 0; // 0 unless a value is ±Infinity or NaN
  if (probe === 0) return null;
  let bad = 0;
  while (Number.isFinite(v[bad])) bad++;
  return new FulcraError(
    'design-overflow',
    `The design column "${name}" of term "${term}" is ${v[bad]} in row ${sheetRow(data, sel.rowsUsed[bad])}: ` +
      'the values are too large for double precision.',
    'Rescale the predictor (e.g. other units) before fitting.',
  );
}

/**
 * Encodes every term in recipe order: `alloc` gives each design column (1, 2, …) its storage, `use(j, values)`
 * sees it once written, `release` gets a term's columns back when the term is done. Returns the column
 * bookkeeping; throws the first non-finite value (in column order) after every term is encoded.
 */
function encodeTerms(
  recipe: DesignRecipe,
  data: Dataset,
  sel: RecipeRows,
  alloc: () => Float64Array,
  use: (j: number, values: Float64Array) => void,
  release?: (values: Float64Array[]) => void,
) {
  const encodeTerm = termEncoder(recipe, data, sel);
  const columnNames = [INTERCEPT],
    columnTerms = [INTERCEPT];
  const termColumns: { name: string; columns: number[] }[] = [];
  let overflow: FulcraError | null = null;
  for (const t of recipe.terms) {
    const cs = encodeTerm(t, alloc);
    termColumns.push({ name: t.name, columns: cs.map((_, k) => columnNames.length + k) });
    for (const c of cs) {
      overflow ??= overflowError(data, sel, c.name, t.name, c.values);
      use(columnNames.length, c.values);
      columnNames.push(c.name);
      columnTerms.push(t.name);
    }
    release?.(cs.map((c) => c.values));
  }
  if (overflow) throw overflow;
  return { columnNames, columnTerms, termColumns };
}

/** The 0/1 outcome of the used rows (event = recipe.event); throws naming the row of a numeric outcome not 0/1. */
function outcomeVector(recipe: DesignRecipe, data: Dataset, sel: RecipeRows): Float64Array | null {
  const { outcomeCol, rowsUsed, n } = sel;
  if (!outcomeCol) return null;
  const y = allocF64(n);
  if (outcomeCol.kind === 'categorical') {
    const ev = outcomeCol.levels.indexOf(recipe.event);
    for (let i = 0; i < n; i++) y[i] = outcomeCol.codes[rowsUsed[i]] === ev ? 1 : 0;
    return y;
  }
  const ev = Number(recipe.event);
  for (let i = 0; i < n; i++) {
    const v = outcomeCol.values[rowsUsed[i]];
    if (v !== 0 && v !== 1) {
      throw new FulcraError(
        'outcome-not-binary',
        `Row ${sheetRow(data, rowsUsed[i])}: the outcome "${recipe.outcome}" is ${v}; ` +
          'a numeric outcome must be 0 or 1.',
      );
    }
    y[i] = v === ev ? 1 : 0;
  }
  return y;
}

/**
 * The frequency weights of the used rows, or null without a weights column; throws naming the spreadsheet row of a
 * weight that is not a whole number ≥ 1 (a frequency weight counts identical cases).
 */
function weightsVector(recipe: DesignRecipe, data: Dataset, sel: RecipeRows): Float64Array | null {
  const { weightsCol, rowsUsed, n } = sel;
  if (!weightsCol) return null;
  const get = numericGetter(weightsCol);
  const w = allocF64(n);
  for (let i = 0; i < n; i++) {
    const v = get(rowsUsed[i]);
    if (!(Number.isInteger(v) && v >= 1)) {
      throw new FulcraError(
        'bad-weight',
        `Row ${sheetRow(data, rowsUsed[i])}: the weight "${recipe.weights}" is ${v}; a frequency weight counts ` +
          'identical cases, so it must be a whole number of at least 1.',
        'Correct the weight in that row, or leave the row out of the file (a weight of 0 means no cases).',
      );
    }
    w[i] = v;
  }
  return w;
}

/**
 * Builds the design matrix for `data` from a recipe (fit data, new data for scoring or external validation).
 * Rows with a missing value in a used column are dropped and counted per column. An unseen categorical level
 * throws a FulcraError naming the spreadsheet row (sheetRow) and column. The outcome is encoded (and rows missing
 * it dropped) when its column exists, unless `outcome: 'ignore'` (scoring).
 */
export function designFromRecipe(recipe: DesignRecipe, data: Dataset, opts: RecipeOptions = {}): EncodedDesign {
  const sel = recipeRows(recipe, data, opts);
  const { n } = sel;
  const p = recipeWidth(recipe);
  // X in shared memory while a row pool is installed, so that its threads can read it, and in a WebAssembly memory
  // where the SIMD kernels run (allocDesign); written column by column.
  const X = opts.scratch && opts.scratch.length >= n * p ? opts.scratch.subarray(0, n * p).fill(0) : allocDesign(n, p);
  X.fill(1, 0, n);
  let next = 1;
  const names = encodeTerms(
    recipe,
    data,
    sel,
    () => X.subarray(next * n, ++next * n),
    () => {},
  );
  if (next !== p) throw new FulcraError('internal', `The design has ${next} columns where the recipe gives ${p}.`);
  const y = outcomeVector(recipe, data, sel);
  const weights = weightsVector(recipe, data, sel);
  const { rowsUsed, nDropped, droppedByColumn } = sel;
  return { X, n, p, y, weights, rowsUsed, nDropped, droppedByColumn, ...names };
}

/** designFromRecipe's rows, outcome and column bookkeeping, with the linear predictor instead of the design. */
export type LinearPredictorRows = Omit<EncodedDesign, 'X' | 'p'> & { eta: Float64Array };

/**
 * The linear predictor Σⱼ βⱼ·xᵢⱼ (intercept first) of the rows of `data`, without building the n×p design: each
 * term's columns go into scratch columns that are added to η in column order and reused, so memory is O(n) and
 * η is bit-for-bit scoreDesign(model, designFromRecipe(recipe, data).X, n). Same rows, errors and messages.
 */
export function linearPredictorFromRecipe(
  recipe: DesignRecipe,
  beta: ArrayLike<number>,
  data: Dataset,
  opts: RecipeOptions = {},
): LinearPredictorRows {
  const sel = recipeRows(recipe, data, opts);
  const { n } = sel;
  const p = recipeWidth(recipe);
  if (beta.length !== p) {
    throw new FulcraError(
      'recipe-mismatch',
      `The data give ${p} design columns but the model has ${beta.length} coefficients.`,
    );
  }
  const eta = allocF64(n); // shared while a row pool is installed: the calibration fits read it as their offset
  if (beta[0] !== 0) for (let i = 0; i < n; i++) eta[i] += beta[0] * 1;
  const spare: Float64Array[] = [];
  const names = encodeTerms(
    recipe,
    data,
    sel,
    () => spare.pop()?.fill(0) ?? new Float64Array(n), // indicator columns rely on zeros
    (j, v) => {
      const bj = beta[j];
      if (bj !== 0) for (let i = 0; i < n; i++) eta[i] += bj * v[i];
    },
    (used) => spare.push(...used),
  );
  const y = outcomeVector(recipe, data, sel);
  const weights = weightsVector(recipe, data, sel);
  const { rowsUsed, nDropped, droppedByColumn } = sel;
  return { eta, n, y, weights, rowsUsed, nDropped, droppedByColumn, ...names };
}

/**
 * The warning that rows were left out for missing values: `lead` followed by the count per column,
 * e.g. `… ("age" 3, "bmi" 1).`; `withColumns` also lists the columns as the warning's terms.
 */
export function droppedRowsWarning(
  code: string,
  lead: string,
  suggestion: string,
  droppedByColumn: Record<string, number>,
  withColumns: boolean,
): EngineWarning {
  const list = Object.entries(droppedByColumn)
    .map(([c, k]) => `"${c}" ${k}`)
    .join(', ');
  return warning(code, `${lead} (${list}).`, suggestion, withColumns ? Object.keys(droppedByColumn) : undefined);
}

function termName(t: ModelSpec['terms'][number]): string {
  if (t.type === 'interaction') return `${t.columns[0]}:${t.columns[1]}`;
  if (t.type === 'spline') return `${t.column} (spline)`;
  return t.column;
}

/** The event level and warnings for the outcome column, or a FulcraError naming it. */
function outcomeEvent(col: Column, event: string | undefined, rows: Int32Array, warnings: EngineWarning[]): string {
  const counts = new Map<string, number>();
  if (col.kind === 'categorical') {
    const byCode = new Array<number>(col.levels.length).fill(0);
    const codes = col.codes;
    for (let i = 0; i < rows.length; i++) byCode[codes[rows[i]]]++;
    col.levels.forEach((l, k) => {
      if (byCode[k] > 0) counts.set(l, byCode[k]);
    });
  } else {
    // 0 and 1 counted in a plain loop (the usual case); any other value through the map
    const byValue = new Map<number, number>();
    const v = col.values;
    let zeros = 0,
      ones = 0;
    for (let i = 0; i < rows.length; i++) {
      const x = v[rows[i]];
      if (x === 0) zeros++;
      else if (x === 1) ones++;
      else byValue.set(x, (byValue.get(x) ?? 0) + 1);
    }
    if (ones > 0) byValue.set(1, ones);
    if (zeros > 0) byValue.set(0, zeros);
    for (const [v, k] of byValue) counts.set(String(v), k);
  }
  const seen = [...counts.keys()];
  if (col.kind === 'numeric') {
    const bad = seen.find((v) => v !== '0' && v !== '1');
    if (bad !== undefined) {
      throw new FulcraError(
        'outcome-not-binary',
        `The outcome "${col.name}" has the value ${bad}; a numeric outcome must be 0 or 1.`,
        'Choose a 0/1 column or a categorical column with an event level.',
      );
    }
    const ev = event ?? '1';
    if (ev !== '0' && ev !== '1')
      throw new FulcraError(
        'unknown-event-level',
        `The event level "${ev}" is not 0 or 1 for the numeric outcome "${col.name}".`,
      );
    return ev;
  }
  if (event !== undefined) {
    if (!col.levels.includes(event)) {
      throw new FulcraError(
        'unknown-event-level',
        `The outcome "${col.name}" has no level "${event}" (levels: ${col.levels.join(', ')}).`,
      );
    }
    return event;
  }
  const ordered = col.levels.filter((l) => counts.has(l));
  if (ordered.length > 2) {
    throw new FulcraError(
      'event-level-needed',
      `The outcome "${col.name}" has ${ordered.length} values (${ordered.join(', ')}); say which one is the event.`,
      'Choose the event level; every other value counts as a non-event.',
    );
  }
  if (ordered.length === 2) {
    warnings.push(
      warning(
        'event-level-assumed',
        `No event level was given for "${col.name}"; "${ordered[1]}" is counted as the event and ` +
          `"${ordered[0]}" as the non-event.`,
        'Set the event level explicitly if this is the wrong way round.',
        [col.name],
      ),
    );
    return ordered[1];
  }
  return ordered[0] ?? '1';
}

/** The weights of `rows` (complete rows), each a whole number ≥ 1 (weightsVector checks them with its message). */
function rowWeights(data: Dataset, name: string, rows: Int32Array): number[] {
  const get = numericGetter(getColumn(data, name));
  return Array.from(rows, (r) => {
    const v = get(r);
    return Number.isInteger(v) && v >= 1 ? v : 1;
  });
}

/** [min, max] over `rows` of every column the terms read as numbers (numeric, spline, numeric interaction part). */
function numericRanges(data: Dataset, terms: RecipeTerm[], rows: Int32Array): Record<string, [number, number]> {
  const names = new Set<string>();
  for (const t of terms) {
    if (t.type === 'numeric' || t.type === 'spline') names.add(t.column);
    if (t.type === 'interaction') for (const c of t.parts) if (getColumn(data, c).kind === 'numeric') names.add(c);
  }
  const out: Record<string, [number, number]> = {};
  for (const name of names) {
    const col = getColumn(data, name);
    const get = numericGetter(col);
    let lo = Infinity,
      hi = -Infinity;
    if (col.kind === 'numeric') {
      const v = col.values;
      for (let i = 0; i < rows.length; i++) {
        const x = v[rows[i]];
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
    } else
      for (let i = 0; i < rows.length; i++) {
        const x = get(rows[i]);
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
    out[name] = [lo, hi];
  }
  return out;
}

/**
 * Builds the fitting design (intercept first) and its recipe from a dataset and a model specification.
 * Numeric terms enter as is; categorical terms as k−1 indicators against the reference level (default: the
 * absence level of a two-level column such as 0/1, FALSE/TRUE or no/yes (levels.ts), else the most frequent
 * level among the rows used); spline terms as restricted cubic splines (splines.ts); interactions as
 * products of the parts' main-effect columns. Complete-case analysis: rows with any used value missing are dropped.
 */
export function buildDesign(data: Dataset, spec: ModelSpec): Design {
  const warnings: EngineWarning[] = [];
  const outcomeCol = getColumn(data, spec.outcome);
  const names = new Set<string>();
  const usedCols = new Set<string>([spec.outcome]);
  if (spec.weights !== undefined) {
    if (spec.weights === spec.outcome)
      throw new FulcraError('weights-as-outcome', `The column "${spec.weights}" cannot be both outcome and weights.`);
    getColumn(data, spec.weights);
    usedCols.add(spec.weights);
  }
  for (const t of spec.terms) {
    const nm = termName(t);
    if (names.has(nm)) throw new FulcraError('duplicate-term', `The term "${nm}" appears twice in the model.`);
    names.add(nm);
    const cs = t.type === 'interaction' ? t.columns : [t.column];
    for (const c of cs) {
      if (c === spec.outcome)
        throw new FulcraError('outcome-as-predictor', `The outcome "${c}" cannot also be a predictor.`);
      if (c === spec.weights)
        throw new FulcraError(
          'weights-as-predictor',
          `The weights column "${c}" cannot also be a predictor.`,
          'A frequency weight says how many cases a row stands for; remove it from the predictors.',
        );
      getColumn(data, c);
      usedCols.add(c);
    }
  }
  const cols = [...usedCols].map((c) => getColumn(data, c));
  const complete = completeRows(cols, data.nRows, null);
  const rows = complete.rowsUsed;
  if (rows.length === 0) {
    const miss = cols.map((c) => ({ c: c.name, k: complete.droppedByColumn[c.name] ?? 0 }));
    miss.sort((a, b) => b.k - a.k);
    throw new FulcraError(
      'no-complete-rows',
      `No row has a value in every column used (most missing: ${miss
        .slice(0, 3)
        .map((m) => `"${m.c}" ${m.k}`)
        .join(', ')}).`,
      'Remove the predictors with the most missing values or fill them in.',
    );
  }
  const event = outcomeEvent(outcomeCol, spec.event, rows, warnings);
  // Cases per complete row: reference levels and spline knots follow the cases, as on one-row-per-case data.
  const caseCount = spec.weights ? rowWeights(data, spec.weights, rows) : null;
  const totalCases = caseCount?.reduce((a, b) => a + b, 0) ?? rows.length;
  if (caseCount && totalCases > 5e7 && spec.terms.some((t) => t.type === 'spline'))
    throw new FulcraError(
      'too-many-cases-for-splines',
      `The weights "${spec.weights}" add up to ${totalCases.toLocaleString('en')} cases; spline knots are placed ` +
        'at quantiles of the cases, which Fulcra computes for at most 50 000 000.',
      'Enter the predictor as a plain numeric term, or fit a sample of the table.',
    );

  const recipeTerms: RecipeTerm[] = [];
  for (const t of spec.terms) {
    const name = termName(t);
    if (t.type === 'interaction') {
      for (const part of t.columns) {
        const pc = getColumn(data, part);
        const hasMain = spec.terms.some((u) => u.type === 'main' && u.column === part);
        if (pc.kind === 'categorical' && !hasMain) {
          throw new FulcraError(
            'interaction-needs-main-effect',
            `The interaction "${name}" uses the categorical column "${part}", which is not in the model on its own.`,
            `Add "${part}" as a main term.`,
          );
        }
      }
      recipeTerms.push({ type: 'interaction', name, parts: [t.columns[0], t.columns[1]] });
      continue;
    }
    const col = getColumn(data, t.column);
    if (t.type === 'spline') {
      const get = numericGetter(col);
      const knots = rcsKnots(
        caseCount
          ? Array.from(rows).flatMap((r, k) => new Array<number>(caseCount[k]).fill(get(r)))
          : Float64Array.from(rows, (r) => get(r)),
        t.knots,
        t.column,
      );
      if (knots.length < t.knots) {
        warnings.push(
          warning(
            'spline-knots-reduced',
            `"${t.column}" has too many tied or too few distinct values for ${t.knots} distinct knots; the spline ` +
              `has ${knots.length} knots instead of ${t.knots}.`,
            'Ask for fewer knots, or enter the column as a plain numeric term.',
            [name],
          ),
        );
      }
      recipeTerms.push({ type: 'spline', name, column: t.column, knots });
      continue;
    }
    if (col.kind === 'numeric') {
      recipeTerms.push({ type: 'numeric', name, column: t.column });
      continue;
    }
    const counts = new Array<number>(col.levels.length).fill(0);
    for (let k = 0; k < rows.length; k++) counts[col.codes[rows[k]]] += caseCount ? caseCount[k] : 1;
    const levels = col.levels.filter((_, k) => counts[k] > 0);
    let reference = t.reference;
    if (reference === undefined) {
      reference = absenceLevel(levels) ?? undefined;
      let best = -1;
      if (reference === undefined)
        col.levels.forEach((l, k) => {
          if (counts[k] > best) {
            best = counts[k];
            reference = l;
          }
        });
    } else if (!levels.includes(reference)) {
      throw new FulcraError(
        'unknown-reference',
        `The reference level "${reference}" does not occur in column "${t.column}" (levels: ${levels.join(', ')}).`,
      );
    }
    if (levels.length < 2) {
      warnings.push(
        warning(
          'constant-predictor',
          `"${t.column}" has the single value "${levels[0]}" in every row used, so it cannot be estimated.`,
          'Remove it from the model.',
          [name],
        ),
      );
    }
    recipeTerms.push({ type: 'categorical', name, column: t.column, levels, reference: reference! });
  }
  const ranges = numericRanges(data, recipeTerms, rows);
  const recipe: DesignRecipe = { outcome: spec.outcome, event, terms: recipeTerms, columnNames: [], ranges };
  if (spec.weights !== undefined) recipe.weights = spec.weights;
  const enc = designFromRecipe(recipe, data);
  recipe.columnNames = enc.columnNames;
  if (enc.nDropped > 0) {
    const verb = enc.nDropped === 1 ? 'was' : 'were';
    const lead = `${enc.nDropped} of ${plural(data.nRows, 'row')} ${verb} left out because of missing values`;
    const hint = 'Check whether the missing values are related to the outcome; if so, consider imputation.';
    warnings.push(droppedRowsWarning('rows-dropped', lead, hint, enc.droppedByColumn, true));
  }
  return { ...enc, y: enc.y!, recipe, warnings };
}
