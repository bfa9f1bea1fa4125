/**
 * Bedside points score (Sullivan, Massaro & D'Agostino 2004, Stat Med 23:1631): the score of a fitted model as a
 * plain record, each case's points, and the score's performance beside the full model's.
 */
export * from './types';
export { buildPointsScore, roundPoints, MAX_POINTS_SPAN } from './buildScore';
export { casePoints, pointsOfRows } from './casePoints';
export { evaluatePointsScore } from './evaluatePoints';
export { attainableTotals, pointsTable } from './table';
export { resolvePointsOptions, checkBaseUnit } from './options';
export { tidyStep } from './categories';
export { readPointsScore } from './readScore';
export { pointsAnalysis } from './pointsAnalysis';
