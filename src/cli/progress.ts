/**
 * What `npm run fit` says on stderr while it works: nothing for work done within 2 s; after that a line per stage and
 * at most one progress line a second. Before a fit that will take minutes it says so, and how to shorten it.
 */
import type { Dataset, ModelSpec } from '../engine/core';
import { designColumnCount } from '../engine/fitting';
import { inferenceSeconds, largeDataPlan, resolveRequest, type AnalysisRequestInput } from '../engine/workflow';

/** Quiet for this long; then progress lines. */
export const QUIET_MS = 2000;
/** Fewest milliseconds between two progress lines of one stage. */
const EVERY_MS = 1000;

export interface Progress {
  /** A new stage ("Reading data.csv", "Fitting the model"); its progress follows with `update`. */
  stage(label: string): void;
  /** `done` of `total` units of the current stage (a fraction when total is 1). */
  update(done: number, total: number): void;
  /** A line said at once, whatever the time (the up-front estimate). */
  say(line: string): void;
}

/** A reporter writing lines to `write`; `now` is the clock in milliseconds (injected by tests). */
export function createProgress(write: (line: string) => void, now: () => number = Date.now): Progress {
  const start = now();
  let label = '';
  let last = -Infinity;
  const elapsed = () => `${Math.round((now() - start) / 1000)} s`;
  return {
    stage(next) {
      label = next;
      last = -Infinity;
    },
    update(done, total) {
      const t = now();
      if (t - start < QUIET_MS || t - last < EVERY_MS) return;
      last = t;
      const part = total === 1 ? `${Math.round(done * 100)}%` : `${done} of ${total}`;
      write(`fulcra: ${label}: ${part} (${elapsed()} so far)`);
    },
    say: (line) => write(`fulcra: ${line}`),
  };
}

/** Multiply-adds a second on one thread (measured ~1.3·10⁹ on the development machine; see DEVELOPERS.md, Speed). */
const RATE = 1e9;
/** Newton iterations of a fit. */
const FIT_ITERATIONS = 8;

/**
 * A rough estimate of the fit's seconds (one thread): each Newton iteration of the fit costs about n·p² multiply-adds
 * for X'WX; profile limits and term tests cost what the large-data rule estimates for them (inferenceSeconds), and
 * count only when the request will run them. Null when the request is bad (the analysis then says why).
 */
export function estimateFit(
  data: Dataset,
  request: AnalysisRequestInput,
): { seconds: number; p: number; profile: boolean; termTests: boolean; terms: number } | null {
  let r;
  try {
    r = resolveRequest(request);
  } catch {
    return null;
  }
  const p = designColumnCount(data, r.spec as ModelSpec);
  const plan = largeDataPlan(data, r);
  const inference = r.method === 'ml' || r.method === 'firth';
  const profile = inference && plan.profile;
  const termTests = inference && plan.termTests;
  const terms = r.spec.terms.length;
  const cost = inferenceSeconds(data.nRows, p, terms, r.method === 'firth');
  const perIteration = data.nRows * p * p + (p * p * p) / 3;
  const seconds =
    (FIT_ITERATIONS * perIteration) / RATE + (profile ? cost.profile : 0) + (termTests ? cost.termTests : 0);
  return { seconds, p, profile, termTests, terms };
}

/** The up-front warning for a fit estimated at a minute or more, naming what takes the time and how to skip it. */
export function minutesWarning(e: NonNullable<ReturnType<typeof estimateFit>>): string | null {
  if (e.seconds < 60) return null;
  const minutes = Math.round(e.seconds / 60);
  const parts: string[] = [];
  if (e.profile) parts.push(`profile-likelihood intervals (two limits for each of ${e.p} coefficients)`);
  if (e.termTests) parts.push(`a likelihood-ratio test of each of ${e.terms} terms`);
  const skip = [e.profile ? '--no-profile' : null, e.termTests ? '--no-term-tests' : null].filter(Boolean);
  return (
    `This fit will take minutes (roughly ${minutes < 1 ? 1 : minutes} min on one thread)` +
    (parts.length ? `: most of it is ${parts.join(' and ')}.` : '.') +
    (skip.length
      ? ` ${skip.join(' and ')} skip${skip.length === 1 ? 's' : ''} that (Wald intervals and p-values stay).`
      : '')
  );
}
