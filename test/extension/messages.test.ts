import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * The message table (extension/public/_locales/en/messages.json) against the code that reads it.
 *
 * Format rules, from the WebExtension i18n messages.json format: Chrome's "Localization message
 * formats" (developer.chrome.com/docs/extensions/mv3/i18n-messages) and MDN's "Locale-specific
 * message reference":
 *  - a message name holds only A-Z, a-z, 0-9, _ and @, and is case-insensitive; names beginning
 *    with @@ are the browser's own (predefined messages);
 *  - "message" is required; "description" and "placeholders" are optional;
 *  - $NAME$ in a message refers to a placeholder, case-insensitively; "$$" is a literal dollar;
 *  - each placeholder has a "content", which may refer to substitutions $1 to $9.
 * "No placeholder left unused" and "placeholders number their substitutions 1..N without a gap"
 * are our own rules (a gap or an unused placeholder is a mistake in a table this size).
 *
 * The call sites are found by scanning extension/** for `message('key', ...)` (and an alias such
 * as `message as t` imported from the browser seam) with a small scanner, not a TypeScript
 * parser: best effort, but every call it cannot read is reported rather than skipped.
 */

const ROOT = join(__dirname, '..', '..');
const TABLE = join(ROOT, 'extension', 'public', '_locales', 'en', 'messages.json');

type Problems = string[];

interface Entry {
  message: string;
  description?: string;
  placeholders?: Record<string, { content: string; example?: string }>;
}

/* ------------------------------------------------------------------------------------------- */
/* The table                                                                                     */

/**
 * Every object key that appears twice in the same object, anywhere in the JSON text: JSON.parse
 * keeps the last one silently, so this reads the text itself. Assumes the text is valid JSON.
 */
export function duplicateKeys(text: string): string[] {
  const dups: string[] = [];
  let i = 0;
  const ws = () => {
    while (i < text.length && /\s/.test(text[i]!)) i++;
  };
  const str = (): string => {
    const start = i;
    i++; // opening quote
    while (text[i] !== '"') i += text[i] === '\\' ? 2 : 1;
    i++;
    return JSON.parse(text.slice(start, i)) as string;
  };
  const value = (path: string): void => {
    ws();
    const c = text[i];
    if (c === '{') {
      i++;
      const seen = new Set<string>();
      ws();
      if (text[i] === '}') {
        i++;
        return;
      }
      for (;;) {
        ws();
        const k = str();
        if (seen.has(k)) dups.push(path ? `${path}.${k}` : k);
        seen.add(k);
        ws();
        i++; // colon
        value(path ? `${path}.${k}` : k);
        ws();
        if (text[i++] === '}') return;
      }
    } else if (c === '[') {
      i++;
      ws();
      if (text[i] === ']') {
        i++;
        return;
      }
      for (let n = 0; ; n++) {
        value(`${path}[${n}]`);
        ws();
        if (text[i++] === ']') return;
      }
    } else if (c === '"') str();
    else while (i < text.length && !/[\s,\]}]/.test(text[i]!)) i++;
  };
  value('');
  return dups;
}

/** What is wrong with a parsed table, one line per fault, naming the message and the field. */
export function tableProblems(table: Record<string, unknown>): Problems {
  const out: Problems = [];
  const lower = new Map<string, string>();
  for (const [name, raw] of Object.entries(table)) {
    if (!/^[A-Za-z0-9_@]+$/.test(name)) out.push(`${name}: a name may hold only A-Z, a-z, 0-9, _ and @`);
    if (name.startsWith('@@')) out.push(`${name}: names beginning with @@ are reserved for the browser`);
    const twin = lower.get(name.toLowerCase());
    if (twin) out.push(`${name}: the same name as ${twin} (names are case-insensitive)`);
    lower.set(name.toLowerCase(), name);
    const e = raw as Partial<Entry>;
    if (typeof e !== 'object' || e === null || typeof e.message !== 'string') {
      out.push(`${name}: "message" must be a string`);
      continue;
    }
    if (e.description !== undefined && typeof e.description !== 'string') out.push(`${name}: "description" must be a string`);
    const placeholders = e.placeholders ?? {};
    const declared = new Map(Object.keys(placeholders).map((p) => [p.toLowerCase(), p]));
    if (declared.size !== Object.keys(placeholders).length) out.push(`${name}: two placeholders differ only in case`);
    const used = new Set([...e.message.replaceAll('$$', '').matchAll(/\$([A-Za-z0-9_@]+)\$/g)].map((m) => m[1]!.toLowerCase()));
    for (const u of used) if (!declared.has(u)) out.push(`${name}: "$${u.toUpperCase()}$" in the message has no placeholder`);
    for (const [low, p] of declared) if (!used.has(low)) out.push(`${name}: placeholder "${p}" is never used in the message`);
    const positions: number[] = [];
    for (const [p, ph] of Object.entries(placeholders)) {
      if (typeof ph?.content !== 'string') {
        out.push(`${name}: placeholder "${p}" needs a string "content"`);
        continue;
      }
      for (const m of ph.content.matchAll(/\$(\d+)/g)) {
        const n = Number(m[1]);
        if (n < 1 || n > 9) out.push(`${name}: placeholder "${p}" refers to $${n}; substitutions are $1 to $9`);
        else positions.push(n);
      }
    }
    const max = Math.max(0, ...positions);
    for (let n = 1; n <= max; n++) if (!positions.includes(n)) out.push(`${name}: substitution $${n} is skipped (placeholders use up to $${max})`);
  }
  return out;
}

/** How many substitutions a message takes: the highest $n its placeholders refer to. */
export function substitutionCount(e: Entry): number {
  const ns = Object.values(e.placeholders ?? {}).flatMap((p) => [...p.content.matchAll(/\$(\d+)/g)].map((m) => Number(m[1])));
  return Math.max(0, ...ns);
}

/* ------------------------------------------------------------------------------------------- */
/* The call sites                                                                                */

export interface CallSite {
  where: string;
  /** The keys the first argument can take (both branches of a conditional); empty if not literal. */
  keys: string[];
  /** Substitutions passed; null when the scanner cannot count them (a spread, a variable array). */
  subs: number | null;
  source: string;
}

/** Splits the argument list that starts just after an opening parenthesis; returns the arguments' text. */
function splitArgs(src: string, start: number): string[] | null {
  const args: string[] = [];
  let depth = 0;
  let from = start;
  for (let i = start; i < src.length; i++) {
    const c = src[i]!;
    if (c === "'" || c === '"' || c === '`') {
      // skip a string or template literal (a template's ${...} may hold quotes of its own)
      for (i++; i < src.length && src[i] !== c; i++) {
        if (src[i] === '\\') i++;
        else if (c === '`' && src[i] === '$' && src[i + 1] === '{') {
          let d = 0;
          for (; i < src.length; i++) {
            if (src[i] === '{') d++;
            else if (src[i] === '}' && --d === 0) break;
          }
        }
      }
    } else if (c === '(' || c === '[' || c === '{') depth++;
    else if (c === ')' || c === ']' || c === '}') {
      if (depth === 0) {
        if (c !== ')') return null;
        const last = src.slice(from, i).trim();
        if (last) args.push(last);
        return args;
      }
      depth--;
    } else if (c === ',' && depth === 0) {
      args.push(src.slice(from, i).trim());
      from = i + 1;
    }
  }
  return null;
}

/** The names under which a file calls the seam's `message` (itself, or `message as t`), from any of its parts. */
function messageAliases(src: string): string[] {
  const names: string[] = [];
  for (const imp of src.matchAll(/import\s*\{([^}]*)\}\s*from\s*['"][./]*(?:shared\/)?(?:browser|native|i18n)['"]/g)) {
    for (const m of imp[1]!.matchAll(/\bmessage\b(?:\s+as\s+(\w+))?/g)) names.push(m[1] ?? 'message');
  }
  return names;
}

export function callSites(src: string, where: string, aliases = messageAliases(src)): CallSite[] {
  const out: CallSite[] = [];
  for (const alias of aliases) {
    // not a method (`.message(`), not the seam's own definition (`function message(`)
    const re = new RegExp(`(?<![.\\w$])(?<!function\\s+)${alias}\\(`, 'g');
    for (const m of src.matchAll(re)) {
      const at = m.index! + m[0].length;
      const line = src.slice(0, m.index).split('\n').length;
      const args = splitArgs(src, at);
      const source = src.slice(m.index, Math.min(src.length, at + 120)).split('\n')[0]!;
      if (!args || args.length === 0) {
        out.push({ where: `${where}:${line}`, keys: [], subs: null, source });
        continue;
      }
      // the string literals of the first argument, except those compared against (`x === 'a' ? 'k1' : 'k2'`)
      const first = args[0]!;
      let keys = [...first.matchAll(/(['"])([^'"\\]*)\1/g)].filter((k) => !/[=!]==?\s*$/.test(first.slice(0, k.index))).map((k) => k[2]!);
      // `t(TABLE[x])`: the string values of `const TABLE = { ... }` in the same file
      const table = /^(\w+)\[[^\]]*\]$/.exec(first);
      const body = table && new RegExp(`const ${table[1]}\\b[^=]*=\\s*\\{([^}]*)\\}`).exec(src);
      if (body) keys = [...body[1]!.matchAll(/:\s*(['"])([^'"\\]*)\1/g)].map((k) => k[2]!);
      let subs: number | null = 0;
      const s = args[1];
      if (s !== undefined) {
        if (s.startsWith('[') && s.endsWith(']')) {
          const inner = splitArgs(`${s.slice(1, -1)})`, 0);
          subs = inner && !inner.some((x) => x.startsWith('...')) ? inner.length : null;
        } else subs = /^[A-Za-z_$][\w$]*$/.test(s) ? null : 1; // a bare name may hold an array
      }
      out.push({ where: `${where}:${line}`, keys, subs, source });
    }
  }
  return out;
}

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((d) => {
    const p = join(dir, d.name);
    if (d.isDirectory()) return d.name === 'node_modules' ? [] : sourceFiles(p);
    return /\.(ts|tsx)$/.test(d.name) ? [p] : [];
  });
}

/* ------------------------------------------------------------------------------------------- */

describe('the checks themselves catch what they are meant to (invented tables)', () => {
  it('finds a duplicate key that JSON.parse would hide, at any depth', () => {
    expect(duplicateKeys('{"a": {"message": "x"}, "b": {"message": "y", "message": "z"}, "a": {}}')).toEqual(['b.message', 'a']);
    expect(duplicateKeys('{"a": {"message": "x \\" y", "placeholders": {"p": {"content": "$1"}}}}')).toEqual([]);
  });

  it('finds a missing placeholder, an unused one, a bad name, a skipped substitution', () => {
    const p = tableProblems({
      okOne: { message: 'Range $RANGE$, costs $$5', placeholders: { range: { content: '$1' } } },
      missing: { message: 'Hello $WHO$' },
      unused: { message: 'Hello', placeholders: { who: { content: '$1' } } },
      'bad-name': { message: 'x' },
      OKONE: { message: 'y' },
      gap: { message: '$A$ $B$', placeholders: { a: { content: '$1' }, b: { content: '$3' } } },
      '@@reserved': { message: 'z' },
    });
    expect(p).toEqual([
      'missing: "$WHO$" in the message has no placeholder',
      'unused: placeholder "who" is never used in the message',
      'bad-name: a name may hold only A-Z, a-z, 0-9, _ and @',
      'OKONE: the same name as okOne (names are case-insensitive)',
      'gap: substitution $2 is skipped (placeholders use up to $3)',
      '@@reserved: names beginning with @@ are reserved for the browser',
    ]);
  });

  it('reads call sites: aliases, conditional keys, substitution counts', () => {
    const src = [
      "import { browser, message as t, send } from '../shared/browser';",
      "t('plain');",
      "t(ok ? 'yes' : 'no', [a, f(b, c), `x ${y('q')} z`]);",
      "t(format === 'markdown' ? 'caseMd' : 'caseText', e.message);",
      't(key);',
      "t('spread', [...parts]);",
      "const WORD: Record<K, string> = { a: 'wordA', 'b-c': 'wordB' };",
      't(WORD[k]);',
      "err.message('notACall');",
    ].join('\n');
    const sites = callSites(src, 'x.ts');
    expect(sites.map((s) => [s.keys, s.subs])).toEqual([
      [['plain'], 0],
      [['yes', 'no'], 3],
      [['caseMd', 'caseText'], 1],
      [[], 0],
      [['spread'], null],
      [['wordA', 'wordB'], 0],
    ]);
  });
});

describe('the message table (Chrome "Localization message formats", MDN "Locale-specific message reference")', () => {
  const text = readFileSync(TABLE, 'utf8');
  const table = JSON.parse(text) as Record<string, Entry>;
  const byLower = new Map(Object.entries(table).map(([k, v]) => [k.toLowerCase(), v]));
  const sites = sourceFiles(join(ROOT, 'extension')).flatMap((f) => callSites(readFileSync(f, 'utf8'), relative(ROOT, f)));

  it('holds every key once', () => {
    expect(duplicateKeys(text)).toEqual([]);
  });

  it('is well formed: names, placeholders used and declared, substitutions $1..$N', () => {
    expect(tableProblems(table)).toEqual([]);
  });

  it('the scan finds the call sites (a guard against a scanner that silently finds nothing)', () => {
    // the popup, the overlay, the options page and the background all read the table
    for (const dir of ['extension/popup/', 'extension/overlay/', 'extension/options/', 'extension/background/']) {
      expect(sites.some((s) => s.where.startsWith(dir)), dir).toBe(true);
    }
  });

  it('every key the code reads is in the table', () => {
    const unreadable = sites.filter((s) => s.keys.length === 0).map((s) => `${s.where}: key not a string literal: ${s.source}`);
    const missing = sites.flatMap((s) => s.keys.filter((k) => !byLower.has(k.toLowerCase())).map((k) => `${s.where}: ${k}`));
    expect([...unreadable, ...missing]).toEqual([]);
  });

  it('no call passes more substitutions than its message takes, nor fewer (an empty placeholder)', () => {
    const wrong = sites.flatMap((s) =>
      s.subs === null
        ? []
        : s.keys
            .filter((k) => byLower.has(k.toLowerCase()) && substitutionCount(byLower.get(k.toLowerCase())!) !== s.subs)
            .map((k) => `${s.where}: ${k} takes ${substitutionCount(byLower.get(k.toLowerCase())!)}, given ${s.subs}`),
    );
    expect(wrong).toEqual([]);
  });

  it('every __MSG_name__ in the manifest is in the table', () => {
    const manifest = readFileSync(join(ROOT, 'manifest.config.ts'), 'utf8');
    const names = [...manifest.matchAll(/__MSG_(\w+?)__/g)].map((m) => m[1]!);
    expect(names.length).toBeGreaterThan(0);
    expect(names.filter((n) => !byLower.has(n.toLowerCase()))).toEqual([]);
  });
});
