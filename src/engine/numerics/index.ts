/** Public surface of engine/numerics. */
export * from './distributions';
export * from './kernels';
export * from './linalg';
export * from './loss';
export * from './quantile';
export * from './rng';
export * from './rowPool';
export * from './searchSorted';
export * from './standardise';
export * from './rowShards';
