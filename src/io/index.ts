export { importFile, importText, importTransferables } from './importFile';
export { listSheets } from './importXlsx';
export { proposeOutcomeEvent, type OutcomeProposal } from './outcome';
export { proposeCountLayout, type CountLayoutProposal } from './countLayout';
export { defaultImportOptions, resolveImportOptions } from './options';
export { DEFAULT_MISSING_TOKENS } from './cellText';
export { monitoringDates, type MonitoringDates } from './monitoringDates';
export { monitorImported } from './monitorImported';
export type * from './types';
