import { FulcraError, type Dataset } from '../engine/core';
import {
  availableBytes,
  checkBudget,
  datasetBytes,
  designColumnCount,
  estimateFitBytes,
  estimateImportBytes,
  sampleShape,
} from '../engine/fitting';
import type { ModelSpec } from '../engine/core';

function enforce(check: ReturnType<typeof checkBudget>): void {
  if (!check.ok) throw new FulcraError(check.code, check.message, check.suggestion);
}

/** Refuses, with a plain message, a file that would not fit in the memory a tab can use (checked before reading). */
export function checkImportBudget(bytes: ArrayBuffer, fileName: string, held: Dataset | null): void {
  const u8 = new Uint8Array(bytes);
  const isZip = u8.length >= 2 && u8[0] === 0x50 && u8[1] === 0x4b;
  const shape =
    isZip || /\.xlsx$/i.test(fileName)
      ? { fileBytes: u8.length, sampleBytes: u8.length, sampleRows: 1, columns: 1, format: 'xlsx' as const }
      : sampleShape(
          new TextDecoder('utf-8').decode(u8.subarray(0, 64 * 1024)),
          u8.length,
          Math.min(u8.length, 64 * 1024),
        );
  enforce(checkBudget(estimateImportBytes(shape), availableBytes() - (held ? datasetBytes(held) : 0)));
}

/** Refuses a model whose fit would not fit in memory next to the data already held. */
export function checkFitBudget(data: Dataset, spec: ModelSpec): void {
  const est = estimateFitBytes({ rows: data.nRows, designColumns: designColumnCount(data, spec) });
  enforce(checkBudget(est, availableBytes() - datasetBytes(data)));
}
