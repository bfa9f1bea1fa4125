export { buildModelReport, REPORT_CAUTIONS } from './buildModelReport';
export { CAUTION_SETTINGS, CAUTIONS_BY_SETTING, cautionSettingOf, pageCaution, type CautionSetting } from './cautions';
export { reportInputFromRecords, type ReportRecords } from './fromEngine';
export { dateRangeOf } from './dateRange';
export { GLOSSARY, GLOSSARY_TERMS, glossaryEntry, type GlossaryEntry, type GlossaryTerm } from './glossary';
export { modelEquation, type ModelEquation } from './equation';
export type { ReportInput } from './reportInput';
export { FULCRA_VERSION } from './version';
