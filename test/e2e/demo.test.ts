import { describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';

/*
 * The main job end to end without a screen, as `npm start -- --headless` runs it: the overlay on
 * the invented demo clip, marks at the truth pixels, the assumptions a reviewer would type, and the
 * printed summary checked against the scene's ground truth by the launcher itself.
 */
describe('npm start -- --headless', () => {
  it('prints the summary, with range and speed inside their intervals and the range within 5 % of the truth', async () => {
    const { stdout } = await promisify(execFile)('node_modules/.bin/tsx', ['extension/tools/start.ts', '--headless'], { timeout: 120_000, maxBuffer: 4 << 20 });
    expect(stdout).toContain('Clip Caliper case summary');
    expect(stdout).toContain('Never operate this tool, or film, while driving.');
    expect(stdout).toMatch(/ok {3}true range inside its interval/);
    expect(stdout).toMatch(/ok {3}range within 5 % of the truth/);
    expect(stdout).toMatch(/ok {3}true speed inside its interval/);
    expect(stdout).not.toContain('FAIL');
  }, 150_000);
});
