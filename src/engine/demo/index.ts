import { FulcraError } from '../core/data';
import { generateSealLog } from './sealFailures';
import type { DemoScenario } from './shared';
import { generateSsiRegistry } from './ssiRegistry';
import { generateSsiWardMonths } from './ssiWardMonths';

export type DemoId = 'ssi' | 'seals' | 'ssi-counts';
export type { DemoScenario, TrueCoefficient } from './shared';
export { generateSsiRegistry, ssiSeededError, ssiTruth } from './ssiRegistry';
export { generateSealLog, sealTruth } from './sealFailures';
export { generateSsiWardMonths, wardMonthTruth } from './ssiWardMonths';
export { generateSsiMonitoring, ssiMonitoringChange, type MonitoringDemo } from './ssiMonitoring';

/** The invented demos by id, at their default size and seed. */
export function generateDemo(id: DemoId): DemoScenario {
  if (id === 'ssi') return generateSsiRegistry();
  if (id === 'seals') return generateSealLog();
  if (id === 'ssi-counts') return generateSsiWardMonths();
  throw new FulcraError('unknown-demo', `There is no demo "${String(id)}". Demos are: ssi, seals, ssi-counts.`);
}
