/** Public surface of engine/workflow: one analysis, one record, shared by the page and `npm run fit`. */
export * from './analyse';
export * from './fitStep';
export * from './monitorStep';
export * from './request';
export * from './sampleSizeStep';
