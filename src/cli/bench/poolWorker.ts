import { parentPort, workerData } from 'node:worker_threads';
import { ROW_BLOCK } from '../../engine/kernels';
import { OP_EXIT, runShare, type PoolShared } from './pool';

const { shared: s, index } = workerData as { shared: PoolShared; index: number };
const work = new Float64Array(ROW_BLOCK * s.p);
let gen = Atomics.load(s.ctrl, 0);
parentPort!.postMessage('ready');
for (;;) {
  Atomics.wait(s.ctrl, 0, gen);
  gen = Atomics.load(s.ctrl, 0);
  if (s.ctrl[2] === OP_EXIT) break;
  runShare(s, index, work);
  Atomics.add(s.ctrl, 1, 1);
  Atomics.notify(s.ctrl, 1);
}
