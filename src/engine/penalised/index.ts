/** Public surface of engine/penalised. */
export * from './coordinateDescent';
export * from './crossValidation';
export * from './folds';
export * from './lambdaPath';
