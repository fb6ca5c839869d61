/**
 * The one error type the engine throws for bad input. Its message always names the field, the value
 * that was given and the range that is allowed, so that every shell (overlay, popup, command line)
 * can show it to the user as it is, next to the field.
 */
export class InputError extends Error {
  readonly field: string;
  readonly value: unknown;
  readonly allowed: string;

  constructor(field: string, value: unknown, allowed: string) {
    super(`${field}: got ${describe(value)}; allowed: ${allowed}`);
    this.name = 'InputError';
    this.field = field;
    this.value = value;
    this.allowed = allowed;
  }
}

/** Thrown when inputs are each valid but together do not determine an answer (e.g. a degenerate fit). */
export class UndeterminedError extends Error {
  readonly reason: string;
  constructor(what: string, reason: string) {
    super(`${what}: cannot be determined: ${reason}`);
    this.name = 'UndeterminedError';
    this.reason = reason;
  }
}

function describe(value: unknown): string {
  if (typeof value === 'number') {
    if (Number.isNaN(value)) return 'NaN';
    if (!Number.isFinite(value)) return value > 0 ? 'Infinity' : '-Infinity';
    return String(value);
  }
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (Array.isArray(value)) return `a list of ${value.length}`;
  return typeof value;
}
