import type { FitResult } from '../core/model';
import { coxSnellR2, riley2020SampleSize, type SampleSizeResult } from '../evaluation/sampleSize';

export interface SampleSizeCheck {
  result: SampleSizeResult | null;
  /** Why the check could not be computed (null when it was). */
  note: string | null;
}

/**
 * Riley et al. (2020, BMJ 368:m441) criteria for the fitted model, with the one events-per-parameter rule of
 * the fit record: the smaller outcome class (min(events, non-events)) over the estimated coefficients besides
 * the intercept. The outcome proportion is that class's share (the criteria are symmetric in it), and the
 * anticipated Cox–Snell R² is the apparent one of a converged maximum-likelihood fit (otherwise, or when it
 * is out of range, the default 15% of its maximum).
 */
export function sampleSizeCheck(f: FitResult): SampleSizeCheck {
  const minority = Math.min(f.events, f.nonEvents);
  const input = {
    parameters: Math.max(1, f.parameters),
    outcomeProportion: minority / f.nUsed,
    actual: { n: f.nUsed, events: minority },
  };
  try {
    let r2: number | undefined;
    if (f.method === 'ml' && f.converged) {
      try {
        r2 = coxSnellR2(f.deviance, f.nullDeviance, f.nUsed);
      } catch {
        r2 = undefined;
      }
    }
    try {
      return {
        result: riley2020SampleSize({ ...input, r2cs: r2 !== undefined && r2 > 0 ? r2 : undefined }),
        note: null,
      };
    } catch {
      return { result: riley2020SampleSize(input), note: null };
    }
  } catch (e) {
    return { result: null, note: `The sample-size check could not be computed: ${(e as Error).message}` };
  }
}
