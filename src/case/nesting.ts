import { CaseFormatError } from './format-error';

/*
 * How deep a case file may nest, checked before anything walks it by recursion. A file the
 * schema describes nests at most LEGIT_FILE_NESTING containers: the file, its `cases` list, a
 * record, its `history` list, an earlier version, its `marks` list, a mark, its `points` list (or
 * `mapping`), a point (or `picture`). The test derives that number from case-file.schema.json.
 * The bound leaves room for a few levels of harmless extra data (dropped on reading) and refuses
 * the rest, so a hostile file costs one loop over its values and never a deep call stack.
 */
export const LEGIT_FILE_NESTING = 9;
export const MAX_FILE_NESTING = 16;
/** A record sits two levels into a file (the file, the `cases` list): one stored fits in a file. */
export const MAX_RECORD_NESTING = MAX_FILE_NESTING - 2;

interface Frame {
  value: object;
  depth: number;
  parent: Frame | null;
  key: string | number;
}

/**
 * Throws CaseFormatError at the first container nested deeper than `limit` (the root container
 * is level 1), naming its path. Iterative: a million-deep array costs a loop, not a stack.
 */
export function checkNesting(root: unknown, rootPath: string, limit: number): void {
  if (typeof root !== 'object' || root === null) return;
  const stack: Frame[] = [{ value: root, depth: 1, parent: null, key: '' }];
  while (stack.length > 0) {
    const f = stack.pop()!;
    if (f.depth > limit) {
      throw new CaseFormatError(
        pathOf(f, rootPath),
        `nested too deep: more than ${limit} levels of objects and lists from ${rootPath} (a case file nests at most ${LEGIT_FILE_NESTING}); nothing was read`,
      );
    }
    if (Array.isArray(f.value)) {
      const a = f.value as unknown[];
      for (let i = a.length - 1; i >= 0; i--) {
        const v = a[i];
        if (typeof v === 'object' && v !== null) stack.push({ value: v, depth: f.depth + 1, parent: f, key: i });
      }
    } else {
      const keys = Object.keys(f.value);
      for (let i = keys.length - 1; i >= 0; i--) {
        const v = (f.value as Record<string, unknown>)[keys[i]!];
        if (typeof v === 'object' && v !== null) stack.push({ value: v, depth: f.depth + 1, parent: f, key: keys[i]! });
      }
    }
  }
}

/** A key as a path names it: `.name` for a plain word, `["…"]` (shortened) for anything else. */
export function pathSegment(key: string | number): string {
  if (typeof key === 'number') return `[${key}]`;
  if (/^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key) && key.length <= 60) return `.${key}`;
  const shown = key.length > 40 ? `${key.slice(0, 40)}…` : key;
  return `[${JSON.stringify(shown)}]`;
}

function pathOf(f: Frame, rootPath: string): string {
  const parts: string[] = [];
  for (let at: Frame | null = f; at && at.parent; at = at.parent) parts.push(pathSegment(at.key));
  return rootPath + parts.reverse().join('');
}
