export { buildModelReport, REPORT_CAUTIONS } from './buildModelReport';
export { reportInputFromRecords, type ReportRecords } from './fromEngine';
export { dateRangeOf } from './dateRange';
export { modelEquation, type ModelEquation } from './equation';
export type { ReportInput } from './reportInput';
export { FULCRA_VERSION } from './version';
