/** Public surface of engine/fitting. */
export * from './firth';
export * from './fit';
export * from './fitOptions';
export * from './inference';
export * from './lossSurface';
export * from './memoryBudget';
export * from './newton';
export * from './oddsRatio';
export * from './predict';
export * from './prepareFit';
export * from './profileCi';
export * from './profileLimits';
export * from './separation';
export * from './termTests';
