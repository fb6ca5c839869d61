import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, posix, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

/*
 * The arrows between the rooms (DEVELOPERS.md, "The three rooms"), read from every source file's
 * imports: static, type-only, re-exports, side-effect imports, import() and `typeof import()`, as
 * the TypeScript compiler's own pre-processor lists them (ts.preProcessFile).
 *
 * - src/engine imports nothing of src/case, src/cli or extension;
 * - src/case imports nothing of src/cli or extension;
 * - extension/shared imports nothing of overlay, popup, background or options;
 * - extension and src/cli reach src only through the door, src/case/index.ts, or its half loaded
 *   on demand, src/case/deferred.ts.
 */

const ROOT = resolve(import.meta.dirname, '../..');
const SOURCE_DIRS = ['src', 'extension'];
// shipped as they are, never imported: locales, icons, store texts
const SKIP = ['extension/public', 'extension/store'];
const CODE = /\.(ts|tsx|mts|mjs|js)$/;

interface Edge {
  from: string;
  to: string;
}

interface Rule {
  name: string;
  from: (file: string) => boolean;
  forbids: (target: string, from: string) => boolean;
}

const under = (file: string, ...dirs: string[]) => dirs.some((d) => file.startsWith(`${d}/`));

// the door, and its half a page loads on demand by import() (src/case/deferred.ts)
const DOORS = ['src/case/index.ts', 'src/case/deferred.ts'];

const RULES: Rule[] = [
  { name: 'the engine imports nothing of the case, the command or the extension', from: (f) => under(f, 'src/engine'), forbids: (t) => under(t, 'src/case', 'src/cli', 'extension') },
  { name: 'the case imports nothing of the command or the extension', from: (f) => under(f, 'src/case'), forbids: (t) => under(t, 'src/cli', 'extension') },
  {
    name: 'extension/shared imports nothing of overlay, popup, background or options',
    from: (f) => under(f, 'extension/shared'),
    forbids: (t) => under(t, 'extension/overlay', 'extension/popup', 'extension/background', 'extension/options'),
  },
  {
    name: 'the extension and the command reach src only through src/case/index.ts (or its deferred half)',
    from: (f) => under(f, 'extension', 'src/cli'),
    // the command's own files are its room, not a way round the door
    forbids: (t, f) => under(t, 'src') && !DOORS.includes(t) && !(under(f, 'src/cli') && under(t, 'src/cli')),
  },
];

/** Every module specifier a source text names, in every form of import and export. */
function specifiersOf(text: string): string[] {
  return ts.preProcessFile(text, true, true).importedFiles.map((f) => f.fileName);
}

/** The project file a relative specifier names (its query dropped, its extension found), or null for a package. */
function resolveSpecifier(fromFile: string, spec: string): string | null {
  if (!spec.startsWith('.')) return null;
  const base = resolve(ROOT, dirname(fromFile), spec.replace(/\?.*$/, ''));
  const found = [base, ...['.ts', '.tsx', '.mts', '.mjs', '.js', '.json'].map((e) => base + e), join(base, 'index.ts'), join(base, 'index.tsx')].find(
    (p) => existsSync(p) && statSync(p).isFile(),
  );
  return relative(ROOT, found ?? base).split(/[\\/]/).join(posix.sep);
}

/** The edges that break a rule. */
function violations(edges: readonly Edge[]): { rule: string; edge: string }[] {
  const out: { rule: string; edge: string }[] = [];
  for (const e of edges) {
    for (const r of RULES) {
      const edge = `${e.from} -> ${e.to}`;
      if (r.from(e.from) && r.forbids(e.to, e.from)) out.push({ rule: r.name, edge });
    }
  }
  return out;
}

function sourceFiles(dir: string): string[] {
  if (SKIP.includes(dir)) return [];
  return readdirSync(join(ROOT, dir), { withFileTypes: true }).flatMap((d) => {
    const p = `${dir}/${d.name}`;
    if (d.isDirectory()) return sourceFiles(p);
    return CODE.test(d.name) ? [p] : [];
  });
}

const FILES = SOURCE_DIRS.flatMap(sourceFiles);

function projectEdges(): Edge[] {
  const edges = new Map<string, Edge>();
  for (const from of FILES) {
    for (const spec of specifiersOf(readFileSync(join(ROOT, from), 'utf8'))) {
      const to = resolveSpecifier(from, spec);
      if (to !== null) edges.set(`${from} -> ${to}`, { from, to });
    }
  }
  return [...edges.values()];
}

describe('the import reader', () => {
  // every form the language has (ECMAScript modules, TypeScript type imports and type queries)
  const text = [
    `import a from './a';`,
    `import type { B } from './b';`,
    `import { type C, d } from './c';`,
    `import './side.css';`,
    `export { e } from './e';`,
    `export * from './f';`,
    `export type { G } from './g';`,
    `const h = () => import('./h');`,
    `type I = typeof import('./i');`,
    `import j from '../overlay/index.ts?script&iife';`,
  ].join('\n');

  it('finds every form of import and export', () => {
    expect(specifiersOf(text).sort()).toEqual(['../overlay/index.ts?script&iife', './a', './b', './c', './e', './f', './g', './h', './i', './side.css'].sort());
  });

  it('resolves a folder to its index and drops a bundler query', () => {
    expect(resolveSpecifier('extension/popup/results.tsx', '../../src/case')).toBe('src/case/index.ts');
    expect(resolveSpecifier('extension/background/call-up.ts', '../overlay/index.ts?script&iife')).toBe('extension/overlay/index.ts');
    expect(resolveSpecifier('src/case/summary.ts', '../engine/units')).toBe('src/engine/units.ts');
    expect(resolveSpecifier('src/cli/solve.ts', 'node:fs')).toBeNull();
  });

  it('catches an arrow pointing up under each rule, and lets the door and the rooms below through', () => {
    const up: Edge[] = [
      { from: 'src/engine/range.ts', to: 'src/case/schema.ts' },
      { from: 'src/engine/range.ts', to: 'extension/shared/browser.ts' },
      { from: 'src/case/marks.ts', to: 'extension/popup/results.tsx' },
      { from: 'src/case/marks.ts', to: 'src/cli/solve.ts' },
      { from: 'extension/shared/form-field.tsx', to: 'extension/overlay/shell.ts' },
      { from: 'extension/shared/form-field.tsx', to: 'extension/options/main.tsx' },
      { from: 'extension/popup/results.tsx', to: 'src/engine/units.ts' },
      { from: 'src/cli/solve.ts', to: 'src/case/summary.ts' },
    ];
    expect(violations(up).map((v) => v.edge)).toEqual(up.map((e) => `${e.from} -> ${e.to}`));
    const down: Edge[] = [
      { from: 'src/case/marks.ts', to: 'src/engine/range.ts' },
      { from: 'extension/popup/results.tsx', to: 'src/case/index.ts' },
      { from: 'extension/popup/results.tsx', to: 'extension/shared/browser.ts' },
      { from: 'extension/background/call-up.ts', to: 'extension/overlay/shell.ts' },
      { from: 'src/cli/solve.ts', to: 'src/case/index.ts' },
      { from: 'src/cli/run.mjs', to: 'src/cli/bundle.mjs' },
    ];
    expect(violations(down)).toEqual([]);
  });
});

describe('the arrows of this source tree', () => {
  const edges = projectEdges();

  it('reads the whole tree', () => {
    expect(FILES.length).toBeGreaterThan(100);
    expect(FILES).toContain('src/engine/units.ts');
    expect(FILES).toContain('extension/popup/results.tsx');
    expect(FILES).toContain('src/cli/run.mjs');
  });

  it('no arrow points up', () => {
    expect(violations(edges)).toEqual([]);
  });
});

/*
 * package.json's "sideEffects" lets the bundler drop a module none of whose exports is used: that is
 * what keeps a page importing one item of the door from loading the rest. A module imported only
 * for what it does on load (`import './announce'`) must therefore be listed there, or the build
 * leaves it out without a word (the background's announcer was, until ./extension/** was listed).
 */
function sideEffectPatterns(): RegExp[] {
  const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { sideEffects?: string[] };
  // webpack's and Vite's reading: a pattern without a slash matches the name anywhere
  return (pkg.sideEffects ?? []).map((p) => {
    const glob = p.includes('/') ? p.replace(/^\.\//, '') : `**/${p}`;
    const re = glob
      .split(/(\*\*\/|\*\*|\*)/)
      .map((part) => (part === '**/' ? '(?:.*/)?' : part === '**' ? '.*' : part === '*' ? '[^/]*' : part.replace(/[.+?^${}()|[\]\\]/g, '\\$&')))
      .join('');
    return new RegExp(`^${re}$`);
  });
}

/** The files a source imports only for their side effects (`import './x'`, nothing bound). */
function bareImports(from: string): string[] {
  const text = readFileSync(join(ROOT, from), 'utf8');
  return [...text.matchAll(/^\s*import\s*['"]([^'"]+)['"]/gm)].map((m) => resolveSpecifier(from, m[1]!)).filter((t): t is string => t !== null);
}

describe('modules imported for their side effects', () => {
  const patterns = sideEffectPatterns();
  const kept = (file: string) => patterns.some((p) => p.test(file));

  it('reads the patterns as the bundler does', () => {
    expect(kept('extension/popup/log.css')).toBe(true);
    expect(kept('extension/background/announce.ts')).toBe(true);
    expect(kept('src/case/index.ts')).toBe(false);
    expect(kept('src/engine/units.ts')).toBe(false);
  });

  it('are all kept by package.json sideEffects (the bundle would drop them otherwise)', () => {
    const bare = FILES.flatMap((from) => bareImports(from).map((to) => ({ from, to })));
    expect(bare.map((e) => e.to)).toContain('extension/background/announce.ts');
    expect(bare.filter((e) => !kept(e.to))).toEqual([]);
  });
});
