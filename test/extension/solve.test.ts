import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import { MAX_FILE_NESTING } from '../../src/case/nesting';

/*
 * `npm run solve` on hostile files: it runs as its own process (tsx), as a reviewer runs it. A
 * deep file must end in one line naming the path, exit 1, not a stack overflow; an old file
 * still solves.
 */
const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), 'solve-'));
const v2 = readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8');

async function solve(file: string): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('node_modules/.bin/tsx', ['extension/tools/solve.ts', file], { maxBuffer: 1 << 24 });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

describe('npm run solve on deep files', () => {
  it.each([10_000, 1_000_000])('a %i-deep array under an unknown key: one line naming the path, exit 1', async (n) => {
    const file = join(dir, `deep-${n}.json`);
    writeFileSync(file, `{"format":"clip-caliper-case","schema":2,"case":${v2.trim().replace(/^\{/, `{"junk":${'['.repeat(n)}${']'.repeat(n)},`)}}`);
    const r = await solve(file);
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(`solve: file.case.junk${'[0]'.repeat(MAX_FILE_NESTING - 2)}: nested too deep: more than ${MAX_FILE_NESTING} levels of objects and lists from file (a case file nests at most 9); nothing was read\n`);
  }, 60_000);

  it('a version 1 file still solves', async () => {
    const r = await solve('test/case/fixtures/v1/case-file.json');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('Clip Caliper case summary');
  }, 60_000);
});
