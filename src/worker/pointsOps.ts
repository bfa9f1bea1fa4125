import { FulcraError } from '../engine/core';
import type { PointsOptions } from '../engine/points';
import { pointsStep, type PointsRecord } from '../engine/workflow';
import { buildPointsCardPdf } from '../report/pointsCardPdf';
import { FULCRA_VERSION } from '../report/version';
import { requireData, requireRecord, type Session } from './session';

/** The last points score built in each session, with the fit it was built from. */
const built = new WeakMap<Session, { fit: unknown; points: PointsRecord }>();

/** The page's points score, or the engine's reason it cannot be built (shown beside the inputs). */
export type PointsAnswer =
  { ok: true; points: PointsRecord } | { ok: false; problem: { code: string; message: string; suggestion: string } };

/** Engine refusals the page shows beside the base-unit inputs rather than as a notice. */
const INLINE = new Set([
  'bad-points-option',
  'bad-points-base-unit',
  'points-interaction',
  'points-column-twice',
  'points-too-many-cases',
  'not-numeric',
]);

/**
 * Builds the bedside points score of the current fit with the user's options (the one path: pointsStep) and keeps
 * it for the PDF and the model file of this fit. Refusals the user fixes (a bad base unit, an interaction) come
 * back as `problem`; other errors are thrown.
 */
export function buildPoints(s: Session, options: Partial<PointsOptions>): PointsAnswer {
  const record = requireRecord(s);
  try {
    const points = pointsStep(record, requireData(s), options);
    built.set(s, { fit: record.fit, points });
    return { ok: true, points };
  } catch (e) {
    const err = e as FulcraError;
    if (!(err instanceof FulcraError) || !(INLINE.has(err.code) || err.code.startsWith('points-'))) throw e;
    return { ok: false, problem: { code: err.code, message: err.message, suggestion: err.suggestion ?? '' } };
  }
}

/** The points score built for the current fit, or undefined (none built, or the model was refitted since). */
export function currentPoints(s: Session): PointsRecord | undefined {
  const held = built.get(s);
  return held && s.record && held.fit === s.record.fit ? held.points : undefined;
}

/** The one-page card of the current points score as a PDF. */
export function pointsCardPdf(s: Session, created: string): Uint8Array {
  const points = currentPoints(s);
  if (!points)
    throw new FulcraError(
      'no-points-score',
      'No points score has been built for the current model.',
      'Build the points score first.',
    );
  return buildPointsCardPdf(points, { fulcraVersion: FULCRA_VERSION, created });
}
