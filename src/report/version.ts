import { version } from '../../package.json';

/** Fulcra's version as in package.json, printed in reports and saved in model/workspace files. */
export const FULCRA_VERSION: string = version;
