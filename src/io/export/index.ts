export { datasetChecksum } from './checksum';
export { sha256Hex, Sha256 } from './sha256';
export {
  createModelFile,
  modelFileToFitResult,
  modelFileToJson,
  MODEL_FILE_VERSION,
  type ModelFile,
  type ModelFileInfo,
} from './modelFile';
export { readModelFile } from './readModelFile';
export { modelToPmml, type PmmlOptions } from './pmml';
export { monitoringSignalsCsv, monitoringUnitsCsv } from './monitoringCsv';
export {
  neutraliseCell,
  predictionsCsv,
  predictionsCsvChunks,
  quoteField,
  type PredictionsCsvOptions,
  type PredictionsForCsv,
} from './predictionsCsv';
export {
  readWorkspaceBytes,
  readWorkspaceFile,
  workspaceToGzip,
  workspaceToJson,
  WORKSPACE_FILE_VERSION,
  type Workspace,
  type WorkspaceFileInfo,
} from './workspaceFile';
export {
  classifyStorageError,
  clearWorkspaceInBrowser,
  loadWorkspaceFromBrowser,
  PersistError,
  saveWorkspaceToBrowser,
  WORKSPACE_KEY,
  type KeyValueBackend,
  type PersistErrorCode,
  type StoredWorkspace,
} from './persist';
