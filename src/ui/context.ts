import { createContext, useContext } from 'react';
import type { AppState } from '../state/appState';
import type { Controller } from '../state/controller';
import { useStore, type Store } from '../state/store';

export interface Env {
  store: Store;
  ctl: Controller;
}

export const EnvContext = createContext<Env | null>(null);

export function useEnv(): Env {
  const env = useContext(EnvContext);
  if (!env) throw new Error('EnvContext missing');
  return env;
}

export function useApp<T>(select: (s: AppState) => T): T {
  return useStore(useEnv().store, select);
}
