import { expect } from 'vitest';
import { FulcraError } from '../../src/engine/core/data';

/** Asserts that f throws a FulcraError with this code and a message matching the pattern. */
export function expectFulcraError(f: () => unknown, code: string, message: RegExp): void {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(FulcraError);
    expect((e as FulcraError).code).toBe(code);
    expect((e as FulcraError).message).toMatch(message);
    return;
  }
  throw new Error('expected a FulcraError');
}
