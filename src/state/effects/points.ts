/** The bedside points score: the worker builds the one record (workflow/pointsStep) and its card PDF. */
import type { PointsOptions } from '../../engine/points';
import type { PointsRecord } from '../../engine/workflow';
import type { PointsAnswer } from '../../worker/pointsOps';
import type { EffectContext } from './context';

export interface PointsEffects {
  /** Builds the score of the shown fit (a newer call wins; undefined when superseded or the engine failed). */
  computePoints(options: Partial<PointsOptions>): Promise<PointsAnswer | undefined>;
  /** The score last built for the shown fit (kept by the engine for the PDF and the model file), or null. */
  currentPoints(): Promise<PointsRecord | null>;
  /** The one-page card of the score built for the shown fit, as PDF bytes (undefined when the engine failed). */
  pointsCardPdf(): Promise<Uint8Array | undefined>;
}

export function pointsEffects({ client }: EffectContext): PointsEffects {
  return {
    computePoints: (options) => client.latest('points', (api) => api.pointsScore(options) as Promise<PointsAnswer>),
    currentPoints: async () => (await client.call((api) => api.currentPoints())) ?? null,
    pointsCardPdf: () => client.call((api) => api.pointsCard(new Date().toISOString())),
  };
}
