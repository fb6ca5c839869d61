import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it } from 'vitest';
import { toCaseFile } from '../../src/case/casefile';
import { MAX_FILE_NESTING } from '../../src/case/nesting';
import { bundleCli, bundlePath, staleness } from '../../src/cli/bundle.mjs';
import { bigCase } from '../case/big-case';

/*
 * `npm run solve` as a reviewer runs it: its own process, through the bundle (src/cli/run.mjs). Held
 * against the goldens main's CLI wrote before the move (test/cli/golden/README.md), byte for byte,
 * and the error lines it printed then. A deep file must end in one line naming the path, exit 1,
 * not a stack overflow; an old file still solves.
 */
const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), 'solve-'));
const golden = (name: string) => readFileSync(`test/cli/golden/${name}`, 'utf8');
const v2 = readFileSync('test/case/fixtures/v2/logged-case.json', 'utf8');
const v2File = join(dir, 'v2-logged.json');
writeFileSync(v2File, `{"format":"clip-caliper-case","schema":2,"case":${v2.trim()}}`);

async function solve(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return solveWith({}, ...args);
}

async function solveWith(env: Record<string, string>, ...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run('node', ['src/cli/run.mjs', ...args], { maxBuffer: 1 << 24, env: { ...process.env, ...env } });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const x = e as { code: number; stdout: string; stderr: string };
    return { code: x.code, stdout: x.stdout, stderr: x.stderr };
  }
}

// a fresh bundle before the timed cases (the first run after a source change builds it)
beforeAll(async () => {
  if (staleness() !== null) await bundleCli();
}, 60_000);

describe('npm run solve prints what main printed before the move (goldens, 49a3ed3)', () => {
  it.each([
    ['v1-case-file.metric.txt', ['test/case/fixtures/v1/case-file.json']],
    ['v1-case-file.imperial.txt', ['test/case/fixtures/v1/case-file.json', '--units', 'imperial']],
    ['v1-case-file.json', ['test/case/fixtures/v1/case-file.json', '--json']],
    ['v2-logged.metric.txt', [v2File]],
    ['v2-logged.aviation.txt', ['--units', 'aviation', v2File]],
  ])('%s', async (name, args) => {
    const r = await solve(...args);
    expect(r).toEqual({ code: 0, stdout: golden(name), stderr: '' });
  }, 60_000);

  it('the invented pass marked at 10 and at 100 timestamps (test/case/big-case.ts), text and JSON', async () => {
    const small = join(dir, 't10.json');
    const big = join(dir, 't100.json');
    writeFileSync(small, JSON.stringify(toCaseFile(bigCase({ timestamps: 10 }), '0.1.0')));
    writeFileSync(big, JSON.stringify(toCaseFile(bigCase({ timestamps: 100 }), '0.1.0')));
    expect(await solve(small, '--json')).toEqual({ code: 0, stdout: golden('big-10.json'), stderr: '' });
    expect(await solve(big)).toEqual({ code: 0, stdout: golden('big-100.metric.txt'), stderr: '' });
    const json = await solve(big, '--json');
    expect(json.code).toBe(0);
    expect(createHash('sha256').update(json.stdout).digest('hex')).toBe(golden('big-100.json.sha256').trim());
  }, 120_000);

  it('the 100-timestamp case gives the same bytes with its frames solved on a second thread and on one (CLIP_CALIPER_THREADS=1)', async () => {
    const big = join(dir, 't100-threads.json');
    writeFileSync(big, JSON.stringify(toCaseFile(bigCase({ timestamps: 100 }), '0.1.0')));
    // the default solves the frames beside the pass where the machine has two processors; forced onto one here
    const one = await solveWith({ CLIP_CALIPER_THREADS: '1' }, big, '--json');
    expect(one.code).toBe(0);
    expect(createHash('sha256').update(one.stdout).digest('hex')).toBe(golden('big-100.json.sha256').trim());
  }, 120_000);

  it.each([
    ['no file', [], 'usage: npm run solve -- FILE [--json] [--units metric|imperial|aviation]'],
    ['a missing file', [join(dir, 'nothing.json')], `${join(dir, 'nothing.json')}: no such file`],
    ['an unknown unit system', ['test/case/fixtures/v1/case-file.json', '--units', 'furlong'], '--units: got "furlong"; allowed: metric, imperial, aviation'],
    ['a bare record, not a case file', ['test/case/fixtures/v1/marked-case.json'], 'file.format: expected "clip-caliper-case"'],
  ])('%s: one line naming it, exit 1, nothing on stdout', async (_what, args, line) => {
    expect(await solve(...args)).toEqual({ code: 1, stdout: '', stderr: `solve: ${line}\n` });
  }, 60_000);
});

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

describe('the bundle is built once, not on each call', () => {
  it('two runs in a row leave the bundle as it was', async () => {
    const before = statSync(bundlePath()).mtimeMs;
    await solve('test/case/fixtures/v1/case-file.json');
    await solve('test/case/fixtures/v1/case-file.json');
    expect(statSync(bundlePath()).mtimeMs).toBe(before);
  }, 60_000);

  it('is due again when it is missing or a file it was made from is newer', async () => {
    const out = join(dir, 'bundle');
    expect(staleness(out)).toBe('no bundle yet');
    await bundleCli(out);
    expect(staleness(out)).toBeNull();
    // a source saved after the build began: its time set ahead rather than touching the real source
    const meta = JSON.parse(readFileSync(join(out, 'solve.meta.json'), 'utf8')) as { inputs: string[] };
    const source = join(dir, 'source.ts');
    writeFileSync(source, '');
    const later = new Date(Date.now() + 60_000);
    utimesSync(source, later, later);
    writeFileSync(join(out, 'solve.meta.json'), JSON.stringify({ ...meta, inputs: [...meta.inputs, source] }));
    expect(staleness(out)).toBe(`${source}: changed`);
    rmSync(source);
    expect(staleness(out)).toBe(`${source}: gone`);
    rmSync(bundlePath(out));
    expect(staleness(out)).toBe('no bundle yet');
  }, 60_000);
});
