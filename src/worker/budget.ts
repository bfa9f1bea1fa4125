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
import type { ImportShape, MemoryEstimate } from '../engine/fitting';
import { listZip } from '../io/zip';

function enforce(check: ReturnType<typeof checkBudget>): void {
  if (!check.ok) throw new FulcraError(check.code, check.message, check.suggestion);
}

/** What is coming in: a table (a spreadsheet file, or pasted cells as text) or a workspace file. */
export type IncomingKind = 'table' | 'workspace';

function tableShape(input: Uint8Array | string, fileName: string): ImportShape {
  if (typeof input === 'string') {
    const sample = input.slice(0, 64 * 1024);
    return sampleShape(sample, 2 * input.length, 2 * sample.length);
  }
  const isZip = input.length >= 2 && input[0] === 0x50 && input[1] === 0x4b;
  if (isZip || /\.xlsx$/i.test(fileName)) {
    let unpackedBytes: number | undefined;
    try {
      unpackedBytes = listZip(input).reduce((s, e) => s + e.uncompressedSize, 0);
    } catch {
      unpackedBytes = undefined; // not a readable zip: the importer says so in its own words
    }
    return {
      fileBytes: input.length,
      sampleBytes: input.length,
      sampleRows: 1,
      columns: 1,
      format: 'xlsx',
      unpackedBytes,
    };
  }
  return sampleShape(
    new TextDecoder('utf-8').decode(input.subarray(0, 64 * 1024)),
    input.length,
    Math.min(input.length, 64 * 1024),
  );
}

/**
 * A workspace file (gzip JSON, or plain JSON): its unpacked size from the gzip trailer (ISIZE, RFC 1952 §2.3.1, the
 * size modulo 2³²), held once as bytes, once as decoded text (2 bytes a character) and once as the parsed data.
 */
function workspaceEstimate(b: Uint8Array): MemoryEstimate {
  const gz = b.length >= 18 && b[0] === 0x1f && b[1] === 0x8b;
  const unpacked = gz ? new DataView(b.buffer, b.byteOffset + b.length - 4, 4).getUint32(0, true) : b.length;
  const parts = [
    { label: 'the file itself', bytes: b.length },
    { label: 'the unpacked workspace, as bytes, as text and as data', bytes: 4 * unpacked },
    { label: 'working overhead', bytes: 32 * 1024 ** 2 },
  ];
  return { job: 'import', bytes: parts.reduce((s, p) => s + p.bytes, 0), rows: 0, columns: 1, parts };
}

/**
 * The one memory guard for everything that comes in (the main file input, files to score or to validate on,
 * monitoring files, pasted cells, workspace files): refuses, with a plain message, input that would not fit in the
 * memory a tab can use next to the data already held, before anything is read. Call it first in every worker call
 * that takes a file or text.
 */
export function guardIncoming(
  input: ArrayBuffer | Uint8Array | string,
  fileName: string,
  held: Dataset | null,
  kind: IncomingKind = 'table',
): void {
  const available = availableBytes() - (held ? datasetBytes(held) : 0);
  const bytes = typeof input === 'string' ? input : input instanceof Uint8Array ? input : new Uint8Array(input);
  if (kind === 'workspace' && typeof bytes !== 'string') {
    const check = checkBudget(workspaceEstimate(bytes), available);
    if (!check.ok)
      throw new FulcraError(
        check.code,
        check.message.replace('This file needs', 'This workspace file needs'),
        'Open it in a browser on a computer with more memory, or build the work again from a smaller sample of ' +
          'the spreadsheet.',
      );
    return;
  }
  enforce(checkBudget(estimateImportBytes(tableShape(bytes, fileName)), available));
}

/** Refuses a model whose fit would not fit in memory next to the data already held. */
export function checkFitBudget(data: Dataset, spec: ModelSpec): void {
  const est = estimateFitBytes({ rows: data.nRows, designColumns: designColumnCount(data, spec) });
  enforce(checkBudget(est, availableBytes() - datasetBytes(data)));
}
