/** Public surface of engine/validation. */
export * from './bootstrap';
export * from './externalValidation';
export * from './pipeline';
export * from './recalibration';
export * from './sharedCases';
