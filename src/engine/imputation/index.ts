/** Public surface of engine/imputation. */
export * from './fitImputed';
export * from './imputeModels';
export * from './mice';
export * from './missingReport';
export * from './pmm';
export * from './rubin';
