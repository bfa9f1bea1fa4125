/** Public surface of engine/design. */
export * from './aliasing';
export * from './design';
export { absenceLevel } from './levels';
export * from './splines';
