/** Worker entry: starts the row pool when the page allows one, and exposes the api through Comlink. */
import * as Comlink from 'comlink';
import { createApi } from './api';
import { startBrowserRowPool } from './rowPoolBrowser';

export type { FulcraApi } from './api';

Comlink.expose(createApi(startBrowserRowPool()));
