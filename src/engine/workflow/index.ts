/** Public surface of engine/workflow: one analysis, one record, shared by the page and `npm run fit`. */
export * from './analyse';
export * from './compareStep';
export * from './fitStep';
export * from './monitorStep';
export * from './pointsStep';
export * from './request';
export * from './sampleSizeStep';
export * from './subgroupStep';
