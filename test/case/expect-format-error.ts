import { expect } from 'vitest';
import { CaseFormatError } from '../../src/case/validate';

/** Runs f, expects it to throw CaseFormatError, and returns that error for the caller's checks. */
export function failure(f: () => unknown): CaseFormatError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(CaseFormatError);
    return e as CaseFormatError;
  }
  throw new Error('did not throw');
}
