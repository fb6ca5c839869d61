/**
 * `npm run package`: builds the shipped extension for Chromium (dist/) and Firefox (dist-firefox/)
 * and writes one store-ready zip per browser into dist-packages/, named with package.json's
 * version, holding the build plus extension/store/PRIVACY.md and CHANGELOG.md, and the source
 * package addons.mozilla.org asks for beside a bundled add-on. A build that would
 * make a bad package (source maps, sources, an overlay listed as web-accessible, a wrong version,
 * a missing or wrongly sized icon) is refused with every problem named; nothing is written then.
 *
 *   npm run package                 build both (under the shared build lock), then zip
 *   npm run package -- --no-build   zip the builds already in dist/ and dist-firefox/
 *   npm run package -- --out DIR    write the zips somewhere else
 *
 * Vite 8 holds a build lock and several people build in this tree: when `flock` exists the builds
 * and the zipping run under /tmp/clip-build.lock, so a zip never mixes two builds. Set
 * CLIP_BUILD_LOCK_HELD=1 when the caller already holds that lock (taking it twice would wait forever).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { delimiter, dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { packageProblems, STORE_DOCS, type PackageFile, type Target } from './package-check.ts';
import { DOS_EPOCH, writeZip } from './zip.ts';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const BUILD_LOCK = '/tmp/clip-build.lock';
export const TARGETS: readonly { target: Target; dir: string; mode: string | null }[] = [
  { target: 'chromium', dir: 'dist', mode: null },
  { target: 'firefox', dir: 'dist-firefox', mode: 'firefox' },
];

export class PackageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'PackageError';
  }
}

/** Every file under `dir`, as archive paths (`/`-separated, sorted so the zip is reproducible). */
export function readTree(dir: string): PackageFile[] {
  const out: PackageFile[] = [];
  const walk = (d: string) => {
    for (const name of readdirSync(d)) {
      const full = join(d, name);
      if (statSync(full).isDirectory()) walk(full);
      else out.push({ path: relative(dir, full).split(sep).join('/'), data: readFileSync(full) });
    }
  };
  walk(dir);
  return out.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
}

export function packageName(target: Target | 'source', version: string): string {
  return `clip-caliper-${target}-${version}.zip`;
}

/** The time written into every entry: SOURCE_DATE_EPOCH (reproducible-builds.org) or the DOS epoch. */
export function archiveTime(env: NodeJS.ProcessEnv = process.env): Date {
  const raw = env.SOURCE_DATE_EPOCH;
  if (raw === undefined || raw === '') return DOS_EPOCH;
  if (!/^\d+$/.test(raw)) throw new PackageError(`SOURCE_DATE_EPOCH: got "${raw}"; allowed: whole seconds since 1970, from 315532800 (1980-01-01)`);
  return new Date(Number(raw) * 1000);
}

export function readVersion(root = ROOT): string {
  const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version?: unknown };
  if (typeof pkg.version !== 'string' || !/^\d+(\.\d+){0,3}$/.test(pkg.version)) {
    // Chromium's manifest version is 1 to 4 dot-separated integers (from memory); a pre-release tag
    // would be refused on upload, and Firefox takes that form too
    throw new PackageError(`package.json version: got ${JSON.stringify(pkg.version)}; allowed: 1 to 4 dot-separated whole numbers`);
  }
  return pkg.version;
}

/** One package's files: the build, then the store documents at the root. */
export function packageFiles(buildDir: string, storeDir: string): PackageFile[] {
  if (!existsSync(join(buildDir, 'manifest.json'))) throw new PackageError(`${buildDir}: no manifest.json; build it first (or drop --no-build)`);
  const files = readTree(buildDir);
  for (const doc of STORE_DOCS) {
    if (files.some((f) => f.path === doc)) throw new PackageError(`${buildDir}/${doc}: the build already holds a file of that name`);
    const path = join(storeDir, doc);
    if (!existsSync(path)) throw new PackageError(`${path}: missing; every package carries it`);
    files.push({ path: doc, data: readFileSync(path) });
  }
  return files;
}

/*
 * addons.mozilla.org asks for the source of bundled or minified code, with build steps, so its
 * reviewers can rebuild the add-on (extensionworkshop.com, "Source code submission"). The source
 * package is every file git tracks or would track (ignored files such as node_modules/ and the
 * builds stay out), read from the working tree: make a release from a clean checkout.
 */
export function sourceFiles(root = ROOT): PackageFile[] {
  const r = spawnSync('git', ['ls-files', '-z', '--cached', '--others', '--exclude-standard'], { cwd: root, maxBuffer: 64 << 20 });
  if (r.error || r.status !== 0) throw new PackageError(`git ls-files: ${r.error?.message ?? r.stderr.toString('utf8').trim()}; the source package needs a git checkout`);
  const paths = [...new Set(r.stdout.toString('utf8').split('\0').filter((p) => p !== ''))].sort();
  return paths
    .filter((p) => existsSync(join(root, p)) && statSync(join(root, p)).isFile())
    .map((p) => ({ path: p, data: readFileSync(join(root, p)) }));
}

/** Problems with a source package: it must rebuild the add-on and hold nothing built or installed. */
export function sourceProblems(files: readonly PackageFile[]): string[] {
  const problems: string[] = [];
  const paths = new Set(files.map((f) => f.path));
  for (const need of ['package.json', 'package-lock.json', 'manifest.config.ts', 'vite.config.ts', 'extension/store/SOURCE.md']) {
    if (!paths.has(need)) problems.push(`${need}: missing; allowed: present (the reviewers rebuild from it)`);
  }
  for (const p of paths) if (/^(node_modules|dist[^/]*|test-results)\//.test(p)) problems.push(`${p}: built or installed output; allowed: sources only`);
  return problems;
}

export interface Written {
  target: Target | 'source';
  file: string;
  bytes: number;
  entries: number;
}

/**
 * Checks both builds first and writes nothing unless both are fit: a half-made release (one zip new,
 * one stale) is worse than none.
 */
export function writePackages(options: { root?: string; outDir?: string; when?: Date } = {}): Written[] {
  const root = options.root ?? ROOT;
  const outDir = resolve(root, options.outDir ?? 'dist-packages');
  const version = readVersion(root);
  const storeDir = join(root, 'extension/store');
  const made = TARGETS.map(({ target, dir }) => {
    const files = packageFiles(join(root, dir), storeDir);
    const problems = packageProblems(target, files, version);
    if (problems.length) throw new PackageError(`${target} build in ${dir}/ is not fit to ship:\n  ${problems.join('\n  ')}`);
    return { target, files };
  });
  const source = sourceFiles(root);
  const sourceBad = sourceProblems(source);
  if (sourceBad.length) throw new PackageError(`source package is not fit to ship:\n  ${sourceBad.join('\n  ')}`);
  mkdirSync(outDir, { recursive: true });
  const when = options.when ?? archiveTime();
  return [...made, { target: 'source' as const, files: source }].map(({ target, files }) => {
    const zip = writeZip(files, when);
    const file = join(outDir, packageName(target, version));
    writeFileSync(file, zip);
    return { target, file, bytes: zip.length, entries: files.length };
  });
}

function onPath(command: string): boolean {
  return (process.env.PATH ?? '').split(delimiter).some((d) => d !== '' && existsSync(join(d, command)));
}

function run(command: string, args: string[]): void {
  const r = spawnSync(command, args, { cwd: ROOT, stdio: 'inherit' });
  if (r.error) throw new PackageError(`${command}: ${r.error.message}`);
  if (r.status !== 0) throw new PackageError(`${command} ${args.join(' ')}: exited with ${r.status ?? r.signal}`);
}

function main(argv: string[]): void {
  const known = new Set(['--no-build', '--out']);
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (!known.has(a)) throw new PackageError(`argument ${JSON.stringify(a)}: allowed: --no-build, --out DIR`);
    if (a === '--out') {
      if (argv[i + 1] === undefined) throw new PackageError('--out: needs a folder');
      i++;
    }
  }
  const build = !argv.includes('--no-build');
  const outIndex = argv.indexOf('--out');
  const outDir = outIndex >= 0 ? argv[outIndex + 1] : undefined;

  // take the shared lock once, around the builds and the zipping, by running this script under flock
  if (process.env.CLIP_BUILD_LOCK_HELD !== '1' && onPath('flock')) {
    const tsx = join(ROOT, 'node_modules/.bin/tsx');
    const r = spawnSync('flock', [BUILD_LOCK, tsx, fileURLToPath(import.meta.url), ...argv], {
      cwd: ROOT,
      stdio: 'inherit',
      env: { ...process.env, CLIP_BUILD_LOCK_HELD: '1' },
    });
    process.exit(r.status ?? 1);
  }

  if (build) {
    const vite = join(ROOT, 'node_modules/.bin/vite');
    for (const { mode } of TARGETS) run(vite, mode ? ['build', '--mode', mode] : ['build']);
  }
  for (const w of writePackages(outDir === undefined ? {} : { outDir })) {
    console.log(`${w.target}: ${relative(process.cwd(), w.file)} (${w.entries} files, ${(w.bytes / 1024).toFixed(1)} KiB)`);
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  try {
    main(process.argv.slice(2));
  } catch (e) {
    console.error(e instanceof PackageError ? e.message : e);
    process.exit(1);
  }
}
