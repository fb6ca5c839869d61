import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { writePackages, type Written } from '../../extension/tools/package';
import { launchWithExtension } from './harness';

/*
 * The store packages, made from the builds `npm test` has just made (dist/ and dist-firefox/), and
 * read back only with tools outside the project: Info-ZIP `unzip` for the listing and contents,
 * CPython's `zipfile` for the CRCs, libmagic `file` for the icons' sizes, Mozilla's `web-ext lint`
 * (addons-linter) on the Firefox package as uploaded, and Chromium loading the unpacked Chromium
 * package. Build first: npm run build && npm run build:firefox (under the shared build lock).
 */
const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as { version: string };
const out = mkdtempSync(join(tmpdir(), 'clip-caliper-packages-'));
let written: Written[] = [];

beforeAll(() => {
  written = writePackages({ outDir: out });
});
afterAll(() => {
  rmSync(out, { recursive: true, force: true });
});

const zipOf = (target: string) => {
  const w = written.find((x) => x.target === target);
  if (!w) throw new Error(`no ${target} package was written`);
  return w.file;
};
const names = (zip: string) => execFileSync('unzip', ['-Z1', zip]).toString('utf8').trim().split('\n');
const entry = (zip: string, path: string) => execFileSync('unzip', ['-p', zip, path], { maxBuffer: 64 << 20 });
const manifestOf = (zip: string) => JSON.parse(entry(zip, 'manifest.json').toString('utf8')) as Record<string, any>;
function unpack(zip: string): string {
  const dir = mkdtempSync(join(out, 'unpacked-'));
  execFileSync('unzip', ['-q', zip, '-d', dir]);
  return dir;
}

describe.each(['chromium', 'firefox'])('%s store package', (target) => {
  it(`is named clip-caliper-${target}-<package.json version>.zip and passes zipfile's CRC test (CPython)`, () => {
    expect(zipOf(target)).toBe(join(out, `clip-caliper-${target}-${pkg.version}.zip`));
    const r = spawnSync('python3', ['-c', 'import sys, zipfile; print(zipfile.ZipFile(sys.argv[1]).testzip())', zipOf(target)]);
    expect(r.stdout.toString('utf8').trim()).toBe('None');
  });

  it('holds no source maps, sources, tests or hidden files (listing from unzip)', () => {
    const list = names(zipOf(target));
    expect(list.length).toBeGreaterThan(10);
    expect(list.filter((n) => n.endsWith('.map'))).toEqual([]);
    expect(list.filter((n) => /(^|\/)(src|test|tests|node_modules)\//.test(n))).toEqual([]);
    expect(list.filter((n) => /\.(ts|tsx)$/.test(n) || /(^|\/)\./.test(n))).toEqual([]);
    // the overlay file itself is there: the background injects it on request
    expect(list).toContain('extension/overlay/index.js');
    expect(list).not.toContain('extension/overlay/first.js');
  });

  it('carries the privacy statement and the changelog as they are in extension/store/', () => {
    for (const doc of ['PRIVACY.md', 'CHANGELOG.md']) {
      expect(Buffer.compare(entry(zipOf(target), doc), readFileSync(join('extension/store', doc)))).toBe(0);
    }
    expect(entry(zipOf(target), 'CHANGELOG.md').toString('utf8')).toContain(`## ${pkg.version}`);
  });

  it('has a manifest that is valid JSON with the keys a store needs, at the version of package.json', () => {
    const m = manifestOf(zipOf(target));
    expect(m.manifest_version).toBe(3);
    expect(m.version).toBe(pkg.version);
    for (const key of ['name', 'description', 'default_locale', 'icons', 'action', 'background', 'permissions']) expect(m).toHaveProperty(key);
    expect(names(zipOf(target))).toContain(`_locales/${m.default_locale}/messages.json`);
    expect(m.content_scripts).toBeUndefined();
    expect(m.host_permissions).toBeUndefined();
  });

  it('names in its privacy statement every permission the manifest asks for', () => {
    const m = manifestOf(zipOf(target));
    const privacy = entry(zipOf(target), 'PRIVACY.md').toString('utf8');
    const asked = [...(m.permissions ?? []), ...(m.optional_permissions ?? []), ...(m.optional_host_permissions ?? [])] as string[];
    expect(asked.length).toBeGreaterThan(0);
    expect(asked.filter((p) => !privacy.includes(`\`${p}\``))).toEqual([]);
  });

  it('lists no overlay file as web-accessible', () => {
    const m = manifestOf(zipOf(target));
    const listed = ((m.web_accessible_resources ?? []) as { resources: string[] }[]).flatMap((w) => w.resources);
    expect(listed.filter((r) => r.includes('overlay'))).toEqual([]);
  });

  it('has every icon the manifest names, each a PNG of that size (libmagic `file`)', () => {
    const m = manifestOf(zipOf(target));
    const icons = { ...m.icons, ...Object.fromEntries(Object.entries(m.action.default_icon ?? {}).map(([k, v]) => [`action ${k}`, v])) } as Record<string, string>;
    expect(Object.keys(m.icons)).toContain('128');
    for (const [key, path] of Object.entries(icons)) {
      const size = Number(key.replace('action ', ''));
      const magic = execFileSync('file', ['-b', '-'], { input: entry(zipOf(target), path) }).toString('utf8');
      expect(magic, `${key}: ${path}`).toMatch(new RegExp(`^PNG image data, ${size} x ${size},`));
    }
  });
});

describe('browser-specific keys', () => {
  it('Chromium: a module service worker that is in the package, no Firefox settings', () => {
    const m = manifestOf(zipOf('chromium'));
    expect(m.background).toEqual({ service_worker: expect.any(String), type: 'module' });
    expect(names(zipOf('chromium'))).toContain(m.background.service_worker);
    expect(m.browser_specific_settings).toBeUndefined();
  });

  it('Firefox: background scripts, our own add-on id, a minimum version, no data collected, no Chrome-only keys', () => {
    const m = manifestOf(zipOf('firefox'));
    expect(m.background.service_worker).toBeUndefined();
    for (const s of m.background.scripts) expect(names(zipOf('firefox'))).toContain(s);
    // MDN, browser_specific_settings; extensionworkshop.com, Firefox built-in data consent (140+)
    expect(m.browser_specific_settings.gecko).toEqual({
      id: 'clip-caliper@invented.example',
      strict_min_version: '140.0',
      data_collection_permissions: { required: ['none'] },
    });
    expect(m.minimum_chrome_version).toBeUndefined();
  });

  it('Firefox: the package as uploaded passes web-ext lint (addons-linter) with no errors', () => {
    const dir = unpack(zipOf('firefox'));
    const r = spawnSync(resolve('node_modules/.bin/web-ext'), ['lint', '--source-dir', dir, '--no-config-discovery', '--output', 'json'], {
      env: { ...process.env, NO_UPDATE_NOTIFIER: '1' },
      maxBuffer: 64 << 20,
    });
    const report = JSON.parse(r.stdout.toString('utf8')) as { errors: { code: string; message: string }[]; summary: { errors: number } };
    expect(report.errors.map((e) => `${e.code}: ${e.message}`)).toEqual([]);
    expect(report.summary.errors).toBe(0);
  });
});

describe('source package (addons.mozilla.org asks for it beside bundled code)', () => {
  it('holds what rebuilds the add-on, and nothing built or installed (listing from unzip)', () => {
    const list = names(zipOf('source'));
    expect(zipOf('source')).toBe(join(out, `clip-caliper-source-${pkg.version}.zip`));
    for (const need of ['package.json', 'package-lock.json', 'manifest.config.ts', 'vite.config.ts', 'extension/store/SOURCE.md', 'extension/background/index.ts']) {
      expect(list).toContain(need);
    }
    expect(list.filter((n) => /^(node_modules|dist[^/]*|test-results)\//.test(n))).toEqual([]);
    expect(Buffer.compare(entry(zipOf('source'), 'package.json'), readFileSync('package.json'))).toBe(0);
  });
});

describe('the Chromium package, unpacked as a store would, in Chromium', () => {
  it('starts its service worker and shows its popup at the packaged version', async () => {
    const dir = unpack(zipOf('chromium'));
    mkdirSync(dir, { recursive: true });
    const app = await launchWithExtension(dir);
    try {
      expect(app.worker.url()).toMatch(/^chrome-extension:\/\/[a-p]{32}\//);
      const page = await app.context.newPage();
      await page.goto(`chrome-extension://${app.extensionId}/extension/popup/index.html`);
      await expect.poll(() => page.getByTestId('version').textContent()).toContain(pkg.version);
      await page.close();
    } finally {
      await app.close();
    }
  });
});
