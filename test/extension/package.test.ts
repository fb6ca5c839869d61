import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { DOS_EPOCH, dosDateTime, writeZip, ZipError, type ZipEntry } from '../../extension/tools/zip';
import { forbiddenPath, packageProblems, pngSize, type PackageFile } from '../../extension/tools/package-check';
import { archiveTime, PackageError, sourceProblems, writePackages } from '../../extension/tools/package';

/*
 * The zip writer is checked by readers outside the project: Info-ZIP's `unzip` (lists, extracts,
 * tests CRCs) and CPython's `zipfile` module (headers, CRCs, timestamps, attributes). The PNG sizes
 * are checked against libmagic's `file`. All three are system tools; .ci/run installs them.
 */
function tool(cmd: string, args: string[], input?: Buffer): Buffer {
  return execFileSync(cmd, args, { input, maxBuffer: 64 << 20 });
}

function withZip<T>(zip: Buffer, use: (path: string) => T): T {
  const dir = mkdtempSync(join(tmpdir(), 'clip-caliper-zip-'));
  try {
    const path = join(dir, 'a.zip');
    writeFileSync(path, zip);
    return use(path);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** What CPython's zipfile reads from the archive: per entry, the fields it decoded. */
function pythonView(path: string): { name: string; size: number; method: number; date: number[]; mode: number; utf8: boolean; crcOk: boolean }[] {
  const script = [
    'import json, sys, zipfile',
    'z = zipfile.ZipFile(sys.argv[1])',
    'bad = z.testzip()',
    'print(json.dumps([dict(name=i.filename, size=i.file_size, method=i.compress_type, date=list(i.date_time),',
    '  mode=i.external_attr >> 16, utf8=bool(i.flag_bits & 0x800), crcOk=(bad is None)) for i in z.infolist()]))',
  ].join('\n');
  return JSON.parse(tool('python3', ['-c', script, path]).toString('utf8'));
}

const text = (s: string) => new TextEncoder().encode(s);
const sample: ZipEntry[] = [
  { path: 'manifest.json', data: text('{"manifest_version": 3}\n'.repeat(40)) },
  { path: 'assets/empty.txt', data: new Uint8Array(0) },
  // random bytes do not deflate: the writer must store them as they are
  { path: 'icons/noise.bin', data: randomBytes(4096) },
  { path: 'données/é.txt', data: text('accents in the name: UTF-8 flag (APPNOTE 4.4.4 bit 11)') },
];

describe('zip writer, read back by unzip (Info-ZIP) and Python zipfile', () => {
  it('unzip lists every entry, in order, and extracts each byte for byte', () => {
    withZip(writeZip(sample), (path) => {
      const names = tool('unzip', ['-Z1', path]).toString('utf8').trim().split('\n');
      expect(names).toEqual(sample.map((e) => e.path));
      for (const e of sample) expect(Buffer.compare(tool('unzip', ['-p', path, e.path]), Buffer.from(e.data))).toBe(0);
      // -t checks every entry's CRC-32 and sizes
      expect(tool('unzip', ['-t', path]).toString('utf8')).toMatch(/No errors detected/);
    });
  });

  it('Python zipfile finds CRCs right, deflate where it pays and stored otherwise, UTF-8 names, file mode 644', () => {
    withZip(writeZip(sample), (path) => {
      const view = pythonView(path);
      expect(view.map((v) => v.name)).toEqual(sample.map((e) => e.path));
      expect(view.every((v) => v.crcOk)).toBe(true);
      expect(view.map((v) => v.size)).toEqual(sample.map((e) => e.data.length));
      // zipfile: ZIP_DEFLATED = 8, ZIP_STORED = 0
      expect(view.find((v) => v.name === 'manifest.json')!.method).toBe(8);
      expect(view.find((v) => v.name === 'icons/noise.bin')!.method).toBe(0);
      expect(view.every((v) => v.utf8)).toBe(true);
      expect(view.every((v) => v.mode === 0o100644)).toBe(true);
    });
  });

  it('writes the time it is given, as Python reads it (MS-DOS time has 2 s steps)', () => {
    const when = new Date(Date.UTC(2026, 11, 2, 1, 23, 45));
    withZip(writeZip(sample.slice(0, 1), when), (path) => {
      expect(pythonView(path)[0]!.date).toEqual([2026, 12, 2, 1, 23, 44]);
    });
    withZip(writeZip(sample.slice(0, 1)), (path) => {
      expect(pythonView(path)[0]!.date).toEqual([1980, 1, 1, 0, 0, 0]);
    });
  });

  it('is reproducible: the same files and time give the same bytes', () => {
    expect(Buffer.compare(writeZip(sample), writeZip(sample))).toBe(0);
  });

  it('an empty archive is still a valid one', () => {
    withZip(writeZip([]), (path) => {
      expect(pythonView(path)).toEqual([]);
    });
  });

  it.each([
    ['', 'non-empty'],
    ['/etc/passwd', 'relative'],
    ['C:/x.js', 'relative'],
    ['a\\b.js', '/ as the only separator'],
    ['../up.js', '".."'],
    ['a//b.js', 'no empty'],
    ['./a.js', '"."'],
  ])('refuses the path %j, naming the entry and what is allowed', (path, allowed) => {
    expect(() => writeZip([{ path: 'ok.txt', data: text('x') }, { path, data: text('x') }])).toThrow(ZipError);
    expect(() => writeZip([{ path: 'ok.txt', data: text('x') }, { path, data: text('x') }])).toThrow(new RegExp(`zip entry 2 path: .*allowed: .*${allowed.replace(/[.\\]/g, '\\$&')}`));
  });

  it('refuses a path given twice', () => {
    expect(() => writeZip([{ path: 'a.js', data: text('1') }, { path: 'a.js', data: text('2') }])).toThrow(/zip entry 2 path: "a.js" appears twice/);
  });

  it('refuses times a ZIP cannot hold, naming the allowed range', () => {
    expect(() => dosDateTime(new Date(Date.UTC(1979, 11, 31)))).toThrow(/zip timestamp: got 1979-12-31.*allowed: 1980-01-01 to 2107-12-31/);
    expect(() => dosDateTime(new Date(Number.NaN))).toThrow(/invalid date/);
    expect(dosDateTime(DOS_EPOCH)).toEqual({ date: (0 << 9) | (1 << 5) | 1, time: 0 });
  });
});

describe('SOURCE_DATE_EPOCH (reproducible-builds.org convention)', () => {
  it('is used when set, the DOS epoch otherwise, and a bad value is refused by name', () => {
    expect(archiveTime({ SOURCE_DATE_EPOCH: '1764638625' }).toISOString()).toBe('2025-12-02T01:23:45.000Z');
    expect(archiveTime({})).toEqual(DOS_EPOCH);
    expect(() => archiveTime({ SOURCE_DATE_EPOCH: 'yesterday' })).toThrow(PackageError);
    expect(() => archiveTime({ SOURCE_DATE_EPOCH: 'yesterday' })).toThrow(/SOURCE_DATE_EPOCH: got "yesterday"; allowed: whole seconds/);
  });
});

const ICON_DIR = 'extension/public/icons';
const icon = (size: number) => readFileSync(join(ICON_DIR, `icon-${size}.png`));

describe('PNG size from IHDR (PNG spec 11.2.2), against libmagic `file`', () => {
  it.each([16, 32, 48, 64, 96, 128])('icon-%d.png', (size) => {
    const magic = tool('file', ['-b', join(ICON_DIR, `icon-${size}.png`)]).toString('utf8');
    expect(magic).toMatch(new RegExp(`^PNG image data, ${size} x ${size},`));
    expect(pngSize(icon(size))).toEqual({ width: size, height: size });
  });

  it('is null for something that is not a PNG', () => {
    expect(pngSize(text('GIF89a and more bytes to pass the length'))).toBeNull();
  });
});

/** A package as the builds make it, built up here so that each rule can be broken one at a time. */
function goodPackage(target: 'chromium' | 'firefox', edit: (m: Record<string, unknown>) => void = () => {}): PackageFile[] {
  const icons = { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png', 48: 'icons/icon-48.png', 128: 'icons/icon-128.png' };
  const m: Record<string, unknown> = {
    manifest_version: 3,
    name: '__MSG_extName__',
    description: '__MSG_extDescription__',
    version: '0.1.0',
    default_locale: 'en',
    icons,
    action: { default_popup: 'extension/popup/index.html', default_icon: { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png' } },
    options_ui: { page: 'extension/options/index.html', open_in_tab: true },
    permissions: ['activeTab', 'scripting', 'storage', 'contextMenus'],
    ...(target === 'chromium'
      ? { minimum_chrome_version: '120', background: { service_worker: 'loader.js', type: 'module' } }
      : {
          background: { scripts: ['loader.js'], type: 'module' },
          browser_specific_settings: { gecko: { id: 'clip-caliper@invented.example', strict_min_version: '140.0', data_collection_permissions: { required: ['none'] } } },
        }),
  };
  edit(m);
  return [
    { path: 'manifest.json', data: text(JSON.stringify(m)) },
    { path: '_locales/en/messages.json', data: text('{}') },
    { path: 'loader.js', data: text("import './assets/bg.js';") },
    { path: 'extension/popup/index.html', data: text('<!doctype html>') },
    { path: 'extension/options/index.html', data: text('<!doctype html>') },
    { path: 'extension/overlay/index.js', data: text('(()=>{})()') },
    ...[16, 32, 48, 128].map((s) => ({ path: `icons/icon-${s}.png`, data: icon(s) })),
    { path: 'PRIVACY.md', data: text('# privacy') },
    { path: 'CHANGELOG.md', data: text('# changes') },
  ];
}

describe('package rules (the packager refuses a build that breaks one)', () => {
  it.each(['chromium', 'firefox'] as const)('a well-made %s package has no problems', (target) => {
    expect(packageProblems(target, goodPackage(target), '0.1.0')).toEqual([]);
  });

  it('a version other than package.json is named', () => {
    expect(packageProblems('chromium', goodPackage('chromium'), '0.2.0')).toEqual(['version: got "0.1.0"; allowed: "0.2.0" (package.json)']);
  });

  it.each([
    ['assets/index.js.map', 'a source map'],
    ['src/engine/camera.ts', 'a source, test or dependency folder'],
    ['test/e2e/harness.js', 'a source, test or dependency folder'],
    ['extension/background/index.ts', 'TypeScript source'],
    ['.vite/manifest.json', 'a hidden file'],
  ])('an extra %s is refused as %s', (path, why) => {
    expect(forbiddenPath(path)).toBe(why);
    const files = [...goodPackage('firefox'), { path, data: text('x') }];
    expect(packageProblems('firefox', files, '0.1.0')).toEqual([`${path}: ${why}; allowed: only the built extension and PRIVACY.md, CHANGELOG.md`]);
  });

  it('the built files themselves are allowed', () => {
    for (const f of goodPackage('chromium')) expect(forbiddenPath(f.path)).toBeNull();
  });

  it('a missing privacy statement or changelog is named', () => {
    const files = goodPackage('chromium').filter((f) => f.path !== 'PRIVACY.md' && f.path !== 'CHANGELOG.md');
    expect(packageProblems('chromium', files, '0.1.0')).toEqual([
      'PRIVACY.md: missing; allowed: present at the package root',
      'CHANGELOG.md: missing; allowed: present at the package root',
    ]);
  });

  it('an overlay listed as web-accessible is refused', () => {
    const files = goodPackage('chromium', (m) => {
      m.web_accessible_resources = [{ resources: ['extension/overlay/index.js'], matches: ['<all_urls>'] }];
    });
    expect(packageProblems('chromium', files, '0.1.0')).toEqual(['web_accessible_resources: lists extension/overlay/index.js; allowed: no overlay file']);
  });

  it('an icon of the wrong size, or not there, is named with its field', () => {
    const files = goodPackage('chromium', (m) => {
      m.icons = { 16: 'icons/icon-16.png', 48: 'icons/icon-32.png', 128: 'icons/icon-128.png', 96: 'icons/nowhere.png' };
    });
    expect(packageProblems('chromium', files, '0.1.0')).toEqual([
      'icons.48: icons/icon-32.png is 32 x 32 px; allowed: 48 x 48',
      'icons.96: "icons/nowhere.png" is not in the package',
    ]);
  });

  it('manifest.json that is not JSON is reported, not thrown', () => {
    const files = goodPackage('chromium').map((f) => (f.path === 'manifest.json' ? { ...f, data: text('{ "manifest_version": 3,') } : f));
    const problems = packageProblems('chromium', files, '0.1.0');
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/^manifest.json: not valid JSON/);
  });

  it('the e2e build (host access for the tests) can never be shipped', () => {
    const files = goodPackage('chromium', (m) => {
      m.host_permissions = ['<all_urls>'];
    });
    expect(packageProblems('chromium', files, '0.1.0')).toEqual(['host_permissions: ["<all_urls>"]; allowed: none (that is the e2e build)']);
  });

  it('a Firefox package with a service worker, a Chrome-only key, no id or data collection is refused', () => {
    const files = goodPackage('firefox', (m) => {
      m.background = { service_worker: 'loader.js' };
      m.minimum_chrome_version = '120';
      m.browser_specific_settings = { gecko: { strict_min_version: '140.0', data_collection_permissions: { required: ['websiteContent'] } } };
    });
    expect(packageProblems('firefox', files, '0.1.0')).toEqual([
      'background.scripts: got undefined; allowed: scripts in the package',
      'background.service_worker: present; allowed: background.scripts in Firefox',
      'minimum_chrome_version: present; allowed: none in the Firefox build',
      'browser_specific_settings.gecko.id: got undefined; allowed: an email-like add-on id',
      'browser_specific_settings.gecko.data_collection_permissions.required: got ["websiteContent"]; allowed: ["none"]',
    ]);
  });

  it('a Chromium package made from the Firefox build is refused', () => {
    expect(packageProblems('chromium', goodPackage('firefox'), '0.1.0')).toEqual([
      'background.service_worker: got undefined; allowed: a script in the package',
      'background.scripts: present; allowed: only in the Firefox build',
      'browser_specific_settings: present; allowed: only in the Firefox build',
    ]);
  });
});

describe('source package rules', () => {
  const f = (path: string) => ({ path, data: text('x') });
  const needed = ['package.json', 'package-lock.json', 'manifest.config.ts', 'vite.config.ts', 'extension/store/SOURCE.md'];

  it('the files that rebuild the add-on are enough', () => {
    expect(sourceProblems(needed.map(f))).toEqual([]);
  });

  it('a missing lock file and built or installed output are named', () => {
    const files = [...needed.filter((p) => p !== 'package-lock.json'), 'node_modules/x/index.js', 'dist-firefox/manifest.json'].map(f);
    expect(sourceProblems(files)).toEqual([
      'package-lock.json: missing; allowed: present (the reviewers rebuild from it)',
      'node_modules/x/index.js: built or installed output; allowed: sources only',
      'dist-firefox/manifest.json: built or installed output; allowed: sources only',
    ]);
  });
});

describe('the packager on a bad build', () => {
  it('refuses, names every problem, and writes no zip at all', () => {
    const root = mkdtempSync(join(tmpdir(), 'clip-caliper-root-'));
    try {
      writeFileSync(join(root, 'package.json'), JSON.stringify({ version: '0.1.0' }));
      mkdirSync(join(root, 'extension/store'), { recursive: true });
      writeFileSync(join(root, 'extension/store/PRIVACY.md'), '# privacy');
      writeFileSync(join(root, 'extension/store/CHANGELOG.md'), '# changes');
      for (const [dir, target] of [['dist', 'chromium'], ['dist-firefox', 'firefox']] as const) {
        for (const f of goodPackage(target)) {
          if (f.path.endsWith('.md')) continue;
          mkdirSync(join(root, dir, f.path, '..'), { recursive: true });
          writeFileSync(join(root, dir, f.path), f.data);
        }
      }
      // the Firefox build is fine; the Chromium one carries a source map
      writeFileSync(join(root, 'dist/loader.js.map'), '{}');
      expect(() => writePackages({ root, outDir: 'out' })).toThrow(/chromium build in dist\/ is not fit to ship:\n  loader.js.map: a source map/);
      expect(existsSync(join(root, 'out'))).toBe(false);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });

  it('refuses a package.json version the stores would not take', () => {
    const root = mkdtempSync(join(tmpdir(), 'clip-caliper-root-'));
    try {
      writeFileSync(join(root, 'package.json'), JSON.stringify({ version: '1.0.0-beta.1' }));
      expect(() => writePackages({ root })).toThrow(/package.json version: got "1.0.0-beta.1"; allowed: 1 to 4 dot-separated whole numbers/);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});
