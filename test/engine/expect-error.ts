import { expect } from 'vitest';
import { InputError } from '../../src/engine/errors';

/**
 * Asserts that fn throws the engine's InputError and that its message names the field (the promise
 * every engine function makes). With exactField, the error's `field` must be that name exactly.
 */
export function expectInputError(fn: () => unknown, field: string, opts: { exactField?: boolean } = {}): InputError {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(InputError);
  const err = caught as InputError;
  if (opts.exactField) expect(err.field).toBe(field);
  expect(err.message).toContain(field);
  return err;
}
