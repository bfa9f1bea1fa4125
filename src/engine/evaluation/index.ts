/** Public surface of engine/evaluation. */
export * from './brier';
export * from './calibration';
export * from './calibrationCurve';
export * from './delong';
export * from './evaluate';
export * from './hosmerLemeshow';
export * from './netBenefit';
export * from './prCurve';
export * from './proportionCi';
export * from './roc';
export * from './sampleSize';
export * from './threshold';
