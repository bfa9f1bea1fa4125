import { useEffect, useRef, type RefObject } from 'react';

/** Where focus goes when an action completes: the data view after pasted cells, the fitted model after a fit. */
export type ResultTarget = 'data' | 'model';

let pending: ResultTarget | null = null;
const listeners = new Set<() => void>();

/**
 * Runs `action` and then moves focus to the result's heading, if `succeeded()` says the action gave a result
 * (a failed paste or fit leaves focus where it was). The heading may mount after the action: it then takes
 * focus when it mounts.
 */
export async function thenFocusResult(
  action: Promise<unknown>,
  target: ResultTarget,
  succeeded: () => boolean,
): Promise<void> {
  await action;
  if (!succeeded()) return;
  pending = target;
  for (const l of listeners) l();
  // A heading that is not there soon after (the user moved on) must not take the focus later.
  setTimeout(() => {
    if (pending === target) pending = null;
  }, 1000);
}

/** A ref for the heading (give it tabIndex={-1}) that takes focus when its result has just arrived. */
export function useResultFocus<T extends HTMLElement>(target: ResultTarget): RefObject<T | null> {
  const ref = useRef<T | null>(null);
  useEffect(() => {
    const take = () => {
      if (pending !== target || !ref.current) return;
      pending = null;
      ref.current.focus();
    };
    listeners.add(take);
    take();
    return () => {
      listeners.delete(take);
    };
  }, [target]);
  return ref;
}
