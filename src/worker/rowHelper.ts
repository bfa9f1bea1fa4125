/**
 * One helper thread of the engine worker's row pool (src/worker/rowPoolBrowser.ts): sums its chunks of rows of
 * each pass it is sent, in shared memory, and counts itself done (src/engine/numerics/rowPool.ts, helperRun); and
 * reads the parts of a large delimited file it is sent (src/io/parallelParse.ts).
 */
import { helperRun, type RowJob } from '../engine/numerics';
import { answerPart } from '../io/parallelParse';

const work: { buf?: Float64Array } = {};
const scope = self as unknown as { postMessage(m: unknown, transfer: Transferable[]): void };
self.onmessage = (e: MessageEvent<{ job: RowJob; k0: number; k1: number }>) => {
  // a part of a large file to read (src/io/parallelParse.ts), else the chunks of a pass
  if (!answerPart(e.data, (reply, transfer) => scope.postMessage(reply, transfer))) helperRun(e.data, work);
};
self.postMessage('ready');
