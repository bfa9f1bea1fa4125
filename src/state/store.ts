import { useSyncExternalStore } from 'react';
import { initialState, type AppState } from './appState';

export type Perform<I> = (state: AppState, input: I) => AppState;

/** One store for the page: state changes only through named actions. */
export interface Store {
  get(): AppState;
  apply<I>(perform: Perform<I>, input: I): void;
  subscribe(listener: () => void): () => void;
}

export function createStore(start: AppState = initialState): Store {
  let state = start;
  const listeners = new Set<() => void>();
  return {
    get: () => state,
    apply(perform, input) {
      const next = perform(state, input);
      if (next === state) return;
      state = next;
      for (const l of listeners) l();
    },
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
}

export function useStore<T>(store: Store, select: (s: AppState) => T): T {
  return useSyncExternalStore(store.subscribe, () => select(store.get()));
}
