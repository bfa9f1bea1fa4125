/** Public surface of engine/design. */
export * from './aliasing';
export * from './design';
export * from './splines';
