/**
 * Entry of one Node helper thread (src/cli/nodeRowPool.ts): the row pool's chunks of a pass, and parts of a large
 * delimited file to read (src/io/parallelParse.ts).
 */
import { parentPort } from 'node:worker_threads';
import { helperRun, type RowJob } from '../engine/numerics';
import { answerPart } from '../io/parallelParse';

const work: { buf?: Float64Array } = {};
parentPort!.on('message', (m: { job: RowJob; k0: number; k1: number }) => {
  if (!answerPart(m, (reply, transfer) => parentPort!.postMessage(reply, transfer))) helperRun(m, work);
});
parentPort!.postMessage('ready');
