import { FulcraError } from '../../engine/core';

/**
 * Small structural checks for files Fulcra reads back (model and workspace files). Each throws a FulcraError
 * with `code` and a message naming the field path, e.g. `coefficients[3].estimate must be a number`.
 */
export class FieldChecker {
  constructor(
    private readonly code: string,
    private readonly fileKind: string,
  ) {}

  fail(path: string, what: string): never {
    throw new FulcraError(
      this.code,
      `This ${this.fileKind} is damaged or incomplete: "${path}" ${what}.`,
      'Export the file again from Fulcra, or check that it was not edited by hand.',
    );
  }

  object(v: unknown, path: string): Record<string, unknown> {
    if (typeof v !== 'object' || v === null || Array.isArray(v))
      this.fail(path, v === undefined ? 'is missing' : 'must be an object');
    return v as Record<string, unknown>;
  }

  array(v: unknown, path: string): unknown[] {
    if (!Array.isArray(v)) this.fail(path, v === undefined ? 'is missing' : 'must be a list');
    return v;
  }

  string(v: unknown, path: string): string {
    if (typeof v !== 'string') this.fail(path, v === undefined ? 'is missing' : 'must be text');
    return v;
  }

  number(v: unknown, path: string): number {
    if (typeof v !== 'number' || Number.isNaN(v)) this.fail(path, v === undefined ? 'is missing' : 'must be a number');
    return v;
  }

  finite(v: unknown, path: string): number {
    const n = this.number(v, path);
    if (!Number.isFinite(n)) this.fail(path, 'must be a finite number');
    return n;
  }

  numberOrNull(v: unknown, path: string): number | null {
    return v === null ? null : this.number(v, path);
  }

  boolean(v: unknown, path: string): boolean {
    if (typeof v !== 'boolean') this.fail(path, v === undefined ? 'is missing' : 'must be true or false');
    return v;
  }

  oneOf<T extends string>(v: unknown, options: readonly T[], path: string): T {
    const s = this.string(v, path);
    if (!options.includes(s as T)) this.fail(path, `must be one of ${options.join(', ')}`);
    return s as T;
  }

  stringArray(v: unknown, path: string): string[] {
    return this.array(v, path).map((x, i) => this.string(x, `${path}[${i}]`));
  }

  numberArray(v: unknown, path: string): number[] {
    return this.array(v, path).map((x, i) => this.number(x, `${path}[${i}]`));
  }
}

/** JSON.parse with a FulcraError naming the file kind when the text is not JSON. */
export function parseJsonFile(text: string, code: string, fileKind: string): unknown {
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new FulcraError(
      code,
      `This is not a ${fileKind}: the text is not valid JSON (${(e as Error).message}).`,
      `Choose a ${fileKind} exported by Fulcra.`,
    );
  }
}
