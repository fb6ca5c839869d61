import * as v from 'valibot';

/*
 * The building blocks of the case definition (shape.ts), each with the message the reader gives:
 * a number or text in its range, one of a list, an object of known fields (a list is not one; a
 * field left out gets its own check's message), a range lo..hi. JSON_EXTRA records what a custom
 * check means in JSON Schema, for json-schema.ts.
 */
export const JSON_EXTRA = new WeakMap<object, Record<string, unknown>>();
export const withJson = <T extends object>(action: T, extra: Record<string, unknown>): T => (JSON_EXTRA.set(action, extra), action);

/** The longest a quoted value runs in a message (a message is read, the value may be anything). */
export function describe(x: unknown): string {
  return typeof x === 'string' ? `"${x.length > 40 ? `${x.slice(0, 40)}…` : x}"` : x === undefined ? 'nothing' : (JSON.stringify(x) ?? String(x));
}

/** Characters as a reader counts them: code points (as JSON Schema's maxLength does), not UTF-16 units. */
export function codePoints(s: string): number {
  let pairs = 0;
  for (let i = 0; i < s.length - 1; i++) {
    const c = s.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdbff) {
      const d = s.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        pairs++;
        i++;
      }
    }
  }
  return s.length - pairs;
}

export type Issue = v.BaseIssue<unknown>;

/**
 * A number in [min, max]; JSON has no NaN or Infinity, a value in memory might. One check for
 * finiteness and both ends (not valibot's finite, minValue and maxValue in turn): a mark holds a
 * dozen numbers and a case ten thousand marks, so each step per number shows in the import's time.
 */
export function num(min: number, max: number, description?: string) {
  const within = withJson(
    v.check(
      (n: number) => Number.isFinite(n) && n >= min && n <= max,
      (i: Issue) => (Number.isFinite(i.input) ? `expected ${min} to ${max}, got ${String(i.input)}` : 'expected a finite number'),
    ),
    { minimum: min, maximum: max },
  );
  const number = v.number('expected a finite number');
  return description === undefined ? v.pipe(number, within) : v.pipe(number, within, v.description(description));
}

/** Text of min to max characters (code points). */
export function text(min: number, max: number, description?: string) {
  const length = withJson(
    v.check((s: string) => {
      // code points never outnumber UTF-16 units, and a non-empty string has one: count only when it could matter
      if (min <= 1 && s.length >= min && s.length <= max) return true;
      const n = codePoints(s);
      return n >= min && n <= max;
    }, (i: Issue) => `expected ${min} to ${max} characters, got ${codePoints(i.input as string)}`),
    { minLength: min, maxLength: max },
  );
  const string = v.string('expected text');
  return description === undefined ? v.pipe(string, length) : v.pipe(string, length, v.description(description));
}

export function oneOf<const T extends readonly [string, ...string[]]>(options: T, description: string, withGot = false) {
  return v.pipe(
    v.picklist(options, (i: Issue) => `expected one of ${options.join(', ')}${withGot ? `, got ${describe(i.input)}` : ''}`),
    v.description(description),
  );
}

export const isObject = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);

/** The object without its undefined fields: an absent option stays absent, as JSON would have it. */
export function defined<T extends object>(o: T): T {
  for (const k of Object.keys(o)) if ((o as Record<string, unknown>)[k] === undefined) delete (o as Record<string, unknown>)[k];
  return o;
}

/**
 * An object of these fields (a list is not one). A required field left out gets the message its
 * own check gives for nothing, as if it were given as undefined ("expected text", ...).
 */
export function obj<const E extends v.ObjectEntries>(entries: E) {
  const missing = (i: Issue) => {
    const key = i.path?.at(-1)?.key as string | undefined;
    const entry = key === undefined ? undefined : entries[key];
    return (entry && v.safeParse(entry, undefined, { abortEarly: true }).issues?.[0]?.message) ?? 'expected an object';
  };
  const guard = v.custom<Record<string, unknown>>(isObject, 'expected an object');
  // only an optional field can come out undefined (given as undefined): objects without one skip the pass
  const hasOptional = Object.values(entries).some((e) => e.type === 'optional');
  return hasOptional ? v.pipe(guard, v.object(entries, missing), v.transform(defined)) : v.pipe(guard, v.object(entries, missing));
}

/** A range lo..hi whose ends both lie in [min, max], low end first. */
export function range(min: number, max: number, description: string) {
  return v.pipe(
    obj({ lo: num(min, max, 'low end'), hi: num(min, max, 'high end') }),
    v.rawCheck(({ dataset, addIssue }) => {
      if (dataset.typed && dataset.value.hi < dataset.value.lo) addIssue({ message: `low end ${dataset.value.lo} is above the high end ${dataset.value.hi}` });
    }),
    v.description(`${description} The low end may not be above the high end (checked by the reader; JSON Schema cannot compare two fields).`),
  );
}

/** An issue at a path below the value a rawCheck looks at. */
export type Step = string | number;
export function at(addIssue: (info: { message: string; path: [v.IssuePathItem, ...v.IssuePathItem[]] }) => void, root: unknown, steps: readonly [Step, ...Step[]], message: string): void {
  let holder: unknown = root;
  const path = steps.map((key) => {
    const value = (holder as Record<Step, unknown>)[key];
    const item = (Array.isArray(holder)
      ? { type: 'array', origin: 'value', input: holder, key, value }
      : { type: 'object', origin: 'value', input: holder, key, value }) as v.IssuePathItem;
    holder = value;
    return item;
  }) as [v.IssuePathItem, ...v.IssuePathItem[]];
  addIssue({ message, path });
}

