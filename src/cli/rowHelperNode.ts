/** Entry of one Node helper thread of the row pool (src/cli/nodeRowPool.ts). */
import { parentPort } from 'node:worker_threads';
import { helperRun, type RowJob } from '../engine/numerics';

const work: { buf?: Float64Array } = {};
parentPort!.on('message', (m: { job: RowJob; k0: number; k1: number }) => helperRun(m, work));
parentPort!.postMessage('ready');
