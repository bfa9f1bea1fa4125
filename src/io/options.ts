import { FulcraError } from '../engine/core';
import { DEFAULT_MISSING_TOKENS } from './cellText';
import type { ColumnType, ImportOptions } from './types';

export type ResolvedOptions = Required<Omit<ImportOptions, 'sheet'>> & { sheet?: string | number };

export const defaultImportOptions: ResolvedOptions = {
  format: 'auto',
  delimiter: 'auto',
  decimal: 'auto',
  encoding: 'auto',
  header: 'auto',
  missingTokens: [...DEFAULT_MISSING_TOKENS],
  columnTypes: {},
  stripUnits: [],
  dateOrder: 'auto',
};

const ALLOWED: Record<string, readonly unknown[]> = {
  format: ['auto', 'delimited', 'xlsx'],
  delimiter: ['auto', ',', ';', '\t', '|'],
  decimal: ['auto', '.', ','],
  encoding: ['auto', 'utf-8', 'windows-1252', 'utf-16le', 'utf-16be'],
  header: ['auto', true, false],
  dateOrder: ['auto', 'dmy', 'mdy'],
};
const TYPES: readonly ColumnType[] = ['numeric', 'binary', 'categorical', 'date', 'identifier', 'text', 'empty'];

/** Fills defaults and checks every option against its allowed values; throws FulcraError naming a bad one. */
export function resolveImportOptions(options: ImportOptions = {}): ResolvedOptions {
  const o = { ...defaultImportOptions, ...stripUndefined(options) } as ResolvedOptions;
  for (const [key, allowed] of Object.entries(ALLOWED)) {
    const v = (o as unknown as Record<string, unknown>)[key];
    if (!allowed.includes(v)) {
      throw new FulcraError(
        'invalid-option',
        `Import option ${key} = ${JSON.stringify(v)} is not allowed.`,
        `Use one of: ${allowed.map((a) => JSON.stringify(a)).join(', ')}.`,
      );
    }
  }
  if (!Array.isArray(o.missingTokens) || o.missingTokens.some((t) => typeof t !== 'string')) {
    throw new FulcraError('invalid-option', 'Import option missingTokens must be a list of texts.');
  }
  if (!Array.isArray(o.stripUnits) || o.stripUnits.some((t) => typeof t !== 'string')) {
    throw new FulcraError('invalid-option', 'Import option stripUnits must be a list of column names.');
  }
  for (const [name, t] of Object.entries(o.columnTypes)) {
    if (!TYPES.includes(t)) {
      throw new FulcraError(
        'invalid-option',
        `The type "${String(t)}" chosen for column "${name}" is not a column type.`,
        `Use one of: ${TYPES.join(', ')}.`,
      );
    }
  }
  if (o.sheet !== undefined && typeof o.sheet !== 'string' && !(Number.isInteger(o.sheet) && o.sheet >= 0)) {
    throw new FulcraError(
      'invalid-option',
      `Import option sheet = ${JSON.stringify(o.sheet)} must be a sheet name or a 0-based index.`,
    );
  }
  return o;
}

function stripUndefined(o: ImportOptions): Partial<ImportOptions> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined));
}
