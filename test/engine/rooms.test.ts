import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

// The rooms rule (DEVELOPERS.md): src/engine imports nothing from the browser, Node, the case
// model or the extension; mathjs only in units.ts, so the overlay's kernels stay plain arithmetic.
const dir = 'src/engine';
const files = readdirSync(dir).filter((f) => f.endsWith('.ts'));
const importsOf = (src: string) => [...src.matchAll(/^\s*import[^'"]*['"]([^'"]+)['"]/gm)].map((m) => m[1]!);

describe('engine room', () => {
  it('has modules to check', () => {
    expect(files.length).toBeGreaterThan(10);
  });

  it.each(files)('%s imports only engine siblings (and mathjs only in units.ts)', (f) => {
    const src = readFileSync(join(dir, f), 'utf8');
    for (const spec of importsOf(src)) {
      if (spec === 'mathjs') expect(f).toBe('units.ts');
      else expect(spec).toMatch(/^\.\/[a-z0-9-]+$/);
    }
  });

  it.each(files)('%s uses no browser or Node globals', (f) => {
    const src = readFileSync(join(dir, f), 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
    expect(src).not.toMatch(/\b(window|document|chrome|browser|navigator|localStorage|process|require)\s*[.(]/);
  });
});
