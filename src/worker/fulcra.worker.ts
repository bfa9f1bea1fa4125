/**
 * Worker entry. As the engine (every worker the page starts but its shard helpers): starts the row pool when the
 * page allows one, and exposes the api through Comlink. As a shard helper (name "fulcra-shard-…", started by the
 * page beside the engine when there is no shared memory: src/bridge/shardHelpers.ts): waits for the MessagePort to
 * the engine and answers its row passes (src/engine/numerics/rowShards.ts) and the parts of a large file it is
 * sent to read (src/io/parallelParse.ts). One script for both, so the single
 * file carries the engine once.
 */
import * as Comlink from 'comlink';
import { shardHelper } from '../engine/numerics';
import { answerPart } from '../io/parallelParse';
import { createApi } from './api';
import { startBrowserRowPool } from './rowPoolBrowser';

export type { FulcraApi } from './api';

const scope = self as unknown as { name?: string; onmessage: ((e: MessageEvent) => void) | null };
if (scope.name?.startsWith('fulcra-shard')) {
  scope.onmessage = (e: MessageEvent<{ port?: MessagePort }>) => {
    const port = e.data?.port;
    if (!port) return;
    scope.onmessage = null;
    const answer = shardHelper((reply, transfer) => port.postMessage(reply, transfer));
    // a part of a large file to read (src/io/parallelParse.ts), else a shard's pass
    port.onmessage = (m) => {
      if (!answerPart(m.data, (reply, transfer) => port.postMessage(reply, transfer))) answer(m.data);
    };
  };
} else Comlink.expose(createApi(startBrowserRowPool()));
