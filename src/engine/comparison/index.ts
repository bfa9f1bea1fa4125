/**
 * Public surface of engine/comparison: two models compared on the same rows (nesting and the likelihood-ratio
 * test, AUC with the paired DeLong test, Brier, calibration, net benefit, reclassification at a cut-off), the
 * same-rows check and the common rows for refitting both.
 */
export * from './compareModels';
export * from './material';
export * from './nesting';
export * from './pairedBrier';
export * from './reclassification';
export * from './sameRows';
export * from './types';
