import type { FitResult } from '../engine/core';
import { formatPlain, formatSig, MINUS } from './format';

export interface ModelEquation {
  /** "logit(risk) = b0" followed by one signed product per non-aliased coefficient, e.g. "+ 0.0312 × age". */
  parts: string[];
  /** One line per design variable stating how it is computed from the data. */
  coding: string[];
  /** Coefficients left out because they are aliased. */
  omitted: string[];
}

/**
 * The full model equation, with enough precision (6 significant figures) and coding to re-implement it:
 * logit(risk) = b0 + Σ bj·xj, risk = 1 / (1 + exp(−logit)). Indicator columns are described from the recipe:
 * a categorical term contributes one 0/1 column per non-reference level, in level order.
 */
export function modelEquation(result: FitResult): ModelEquation {
  const coefs = result.coefficients;
  const parts = [`logit(risk) = ${formatSig(coefs[0]?.estimate ?? NaN, 6)}`];
  const omitted: string[] = [];
  for (let j = 1; j < coefs.length; j++) {
    const c = coefs[j];
    if (c.aliased) {
      omitted.push(c.name);
      continue;
    }
    const sign = c.estimate < 0 ? MINUS : '+';
    parts.push(`${sign} ${formatSig(Math.abs(c.estimate), 6)} \u00d7 [${c.name}]`);
  }
  return { parts, coding: codingLines(result), omitted };
}

function codingLines(result: FitResult): string[] {
  const lines: string[] = [];
  const byTerm = new Map(result.terms.map((t) => [t.name, t.columns.map((i) => result.coefficients[i]?.name ?? '?')]));
  for (const term of result.recipe.terms) {
    const cols = byTerm.get(term.name) ?? [];
    switch (term.type) {
      case 'numeric':
        lines.push(`[${cols[0] ?? term.name}] = the value of "${term.column}" as recorded (no transformation).`);
        break;
      case 'categorical': {
        const others = term.levels.filter((l) => l !== term.reference);
        others.forEach((level, i) => {
          lines.push(`[${cols[i] ?? `${term.name}=${level}`}] = 1 if "${term.column}" is "${level}", otherwise 0.`);
        });
        lines.push(`"${term.column}": reference level "${term.reference}" (all its indicators 0).`);
        break;
      }
      case 'spline': {
        const t = term.knots.map((k) => formatPlain(k, 8)).join(', ');
        lines.push(
          `x = "${term.column}" as a restricted cubic spline with ${term.knots.length} knots at ${t}: ` +
            `[${cols[0] ?? term.name}] = x; ${splineBasisText(cols.slice(1), term.knots.length)}`,
        );
        break;
      }
      case 'interaction':
        lines.push(
          `Interaction ${term.name}: each of [${cols.join('], [')}] is the product of the corresponding ` +
            `design variables of "${term.parts[0]}" and "${term.parts[1]}".`,
        );
        break;
    }
  }
  return lines;
}

function splineBasisText(names: string[], k: number): string {
  if (names.length === 0) return '';
  const list = names.map((n) => `[${n}]`).join(', ');
  return (
    `${list} = (c(x − t_j) − c(x − t_${k - 1})·(t_${k} − t_j)/(t_${k} − t_${k - 1}) + ` +
    `c(x − t_${k})·(t_${k - 1} − t_j)/(t_${k} − t_${k - 1})) / (t_${k} − t_1)² for j = 1…${k - 2}, ` +
    `where c(u) = max(u, 0)³ and t_1…t_${k} are the knots.`
  ).replace(/−/g, MINUS);
}

/** Risk from a linear predictor, as printed under the equation. */
export const riskFormula = `risk = 1 / (1 + exp(${MINUS}logit(risk)))`;
