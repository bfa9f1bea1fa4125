/** Public surface of engine/diagnostics: leverage, residuals and influence per row, and the leave-rows-out data. */
export * from './influence';
export * from './leaveOut';
export * from './summary';
