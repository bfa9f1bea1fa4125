/**
 * Public surface of engine/subgroups: subgroup performance (issue 16). `subgroupsFromColumn` assigns every used row
 * of an analysis to a group of one column; `subgroupPerformance` gives the measures per group and overall with
 * the too-small rule; `forestData` reads one measure out as the rows of a forest plot.
 */
export * from './types';
export * from './groups';
export * from './sizeRule';
export * from './performance';
export * from './forest';
export * from './fromAnalysis';
