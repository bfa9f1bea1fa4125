/** Performance by subgroup: the worker computes the one record (workflow/subgroupStep) for the page's choice. */
import type { SubgroupChoice } from '../../engine/workflow';
import type { SubgroupAnswer } from '../../worker/subgroupOps';
import type { EffectContext } from './context';

export interface SubgroupEffects {
  /**
   * Subgroup performance of the shown fit for `choice` (a newer call wins; undefined when superseded or the engine
   * failed, which the notice area reports); a refusal the user fixes in the inputs comes back as `problem`.
   */
  computeSubgroups(choice: SubgroupChoice): Promise<SubgroupAnswer | undefined>;
  /** The choice last computed for the shown fit (kept by the engine for the PDF), or null. */
  lastSubgroupChoice(): Promise<SubgroupChoice | null>;
}

export function subgroupEffects({ client }: EffectContext): SubgroupEffects {
  return {
    computeSubgroups: (choice) => client.latest('subgroups', (api) => api.subgroups(choice) as Promise<SubgroupAnswer>),
    lastSubgroupChoice: async () => (await client.call((api) => api.subgroupChoice())) ?? null,
  };
}
