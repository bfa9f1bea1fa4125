import { FulcraError } from '../core/data';
import { generateSealLog } from './sealFailures';
import type { DemoScenario } from './shared';
import { generateSsiRegistry } from './ssiRegistry';

export type DemoId = 'ssi' | 'seals';
export type { DemoScenario, TrueCoefficient } from './shared';
export { generateSsiRegistry, ssiSeededError, ssiTruth } from './ssiRegistry';
export { generateSealLog, sealTruth } from './sealFailures';
export { generateSsiMonitoring, ssiMonitoringChange, type MonitoringDemo } from './ssiMonitoring';

/** The two invented demos by id, at their default size and seed. */
export function generateDemo(id: DemoId): DemoScenario {
  if (id === 'ssi') return generateSsiRegistry();
  if (id === 'seals') return generateSealLog();
  throw new FulcraError('unknown-demo', `There is no demo "${String(id)}". Demos are: ssi, seals.`);
}
