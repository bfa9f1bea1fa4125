/**
 * One helper thread of the engine worker's row pool (src/worker/rowPoolBrowser.ts): sums its chunks of rows of
 * each pass it is sent, in shared memory, and counts itself done (src/engine/numerics/rowPool.ts, helperRun).
 */
import { helperRun, type RowJob } from '../engine/numerics';

const work: { buf?: Float64Array } = {};
self.onmessage = (e: MessageEvent<{ job: RowJob; k0: number; k1: number }>) => helperRun(e.data, work);
self.postMessage('ready');
