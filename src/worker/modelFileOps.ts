/**
 * "Open model": a Fulcra model file (src/io/export/modelFile.ts) read and validated in the worker, kept in the
 * session beside (not instead of) the current fit, so that later cases can be monitored with a model fitted
 * elsewhere or earlier, without its development data and without a refit.
 */
import { FulcraError } from '../engine/core';
import { modelFileToFitResult, readModelFile } from '../io/export';
import type { OpenedModelView } from './protocol';
import type { Session } from './session';

/** A model file is a few kilobytes; anything far larger is not one (and is not decoded into a string). */
export const MAX_MODEL_FILE_BYTES = 20 * 1024 * 1024;

let serial = 0;

/** Reads `bytes` as a model file, keeps it as the session's opened model and returns what the page shows of it. */
export function openModelFile(s: Session, bytes: ArrayBuffer, fileName: string): OpenedModelView {
  if (bytes.byteLength > MAX_MODEL_FILE_BYTES)
    throw new FulcraError(
      'model-file-invalid',
      `"${fileName}" is ${(bytes.byteLength / 1048576).toFixed(0)} MB; a Fulcra model file is a few kilobytes, ` +
        'so this is not one.',
      'Choose the .fulcra-model.json file saved with "Save the model file (JSON)".',
    );
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new FulcraError(
      'model-file-invalid',
      `"${fileName}" is not UTF-8 text, so it is not a Fulcra model file.`,
      'Choose the .fulcra-model.json file saved with "Save the model file (JSON)".',
    );
  }
  const file = readModelFile(text);
  const fit = modelFileToFitResult(file);
  const view: OpenedModelView = {
    id: ++serial,
    fileName,
    outcome: file.recipe.outcome,
    event: file.recipe.event,
    terms: fit.terms.map((t) => t.name),
    method: file.fit.method,
    created: file.created,
    fulcraVersion: file.fulcraVersion,
    trainedOn: file.training.fileName,
    trainingRows: file.training.rows,
    purpose: file.notes.purpose ?? null,
  };
  s.opened = { view, file, fit };
  return view;
}

/** Forgets the opened model (monitoring goes back to the current fit). */
export function closeModelFile(s: Session): void {
  s.opened = null;
}
