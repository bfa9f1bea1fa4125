/** Worker entry: exposes the api through Comlink. */
import * as Comlink from 'comlink';
import { createApi } from './api';

export type { FulcraApi } from './api';

Comlink.expose(createApi());
