/** Public surface of engine/core. */
export * from './data';
export * from './model';
export * from './warnings';
