import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

// The rooms rule (DEVELOPERS.md) for the case store: it imports only its siblings and the case
// model, never the extension, a package or a browser global, so browser storage reaches it only
// through the port that extension/background/cases.ts wires (same check as test/engine/rooms.test.ts).
const dir = 'src/case/store';
const files = readdirSync(dir).filter((f) => f.endsWith('.ts'));
const importsOf = (src: string) => [...src.matchAll(/^\s*import[^'"]*['"]([^'"]+)['"]/gm)].map((m) => m[1]!);

describe('case store room', () => {
  it('has modules to check', () => {
    expect(files.length).toBeGreaterThan(5);
  });

  it.each(files)('%s imports only store siblings and case modules', (f) => {
    for (const spec of importsOf(readFileSync(join(dir, f), 'utf8'))) expect(spec).toMatch(/^\.\.?\/[a-z0-9-]+$/);
  });

  it.each(files)('%s uses no browser or Node globals', (f) => {
    const src = readFileSync(join(dir, f), 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
    expect(src).not.toMatch(/\b(window|document|chrome|browser|navigator|localStorage|indexedDB|process|require)\s*[.(]/);
  });
});
