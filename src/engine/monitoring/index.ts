export * from './types';
export {
  cusumWeight,
  cusumWeights,
  runCusum,
  runCusumWeights,
  incrementDistribution,
  markovArl,
  cusumLimit,
  simulateArl,
} from './cusum';
export type { CusumRun, IncrementDistribution } from './cusum';
export {
  ppois,
  dpois,
  qpois,
  poissonLimitCount,
  funnelRatioLimits,
  garwoodCount,
  observedExpectedRatio,
} from './poisson';
export { funnelPlot, funnelGrid, overdispersionFactor, type UnitCounts } from './funnel';
export { periodOf, periodRanges, periodTable, dayLabel } from './periods';
export { decimatePath } from './decimate';
export { citlFit, slopeFit } from './calibrationFit';
export { monitorCases, type MonitoringCases, type MonitoringScoringSummary } from './monitor';
export { scoreMonitoring, unitsFromColumn, UNSCORED_LISTED, type UnitCodes } from './score';
export { recalibrateOnPeriods } from './recalibrateOnPeriods';
export { overallSignals, unitSignals, type SignalLine } from '../core/monitoringSignals';
