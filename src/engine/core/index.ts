/** Public surface of engine/core. */
export * from './costs';
export * from './data';
export * from './model';
export * from './vectors';
export * from './warnings';
export * from './wording';
export * from './monitoringSignals';
