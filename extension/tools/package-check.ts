/**
 * What a store package must hold, as a pure function of its file list and manifest, so the packager
 * refuses a wrong build before it writes a zip (and says what is wrong, by field). The tests read the
 * written zips back with tools outside the project; this is the packager's own guard.
 */

export type Target = 'chromium' | 'firefox';

/** Files every package carries next to the built extension (from extension/store/). */
export const STORE_DOCS = ['PRIVACY.md', 'CHANGELOG.md'] as const;

export interface PackageFile {
  path: string;
  data: Uint8Array;
}

const PNG_SIGNATURE = [137, 80, 78, 71, 13, 10, 26, 10];

/** Width and height from a PNG's IHDR chunk (RFC 2083 / PNG spec 11.2.2), or null if it is not a PNG. */
export function pngSize(data: Uint8Array): { width: number; height: number } | null {
  if (data.length < 24 || PNG_SIGNATURE.some((b, i) => data[i] !== b)) return null;
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  if (String.fromCharCode(data[12]!, data[13]!, data[14]!, data[15]!) !== 'IHDR') return null;
  return { width: view.getUint32(16), height: view.getUint32(20) };
}

/** Paths a store package must not carry: source maps, sources, tests, editor and OS leftovers. */
export function forbiddenPath(path: string): string | null {
  if (path.endsWith('.map')) return 'a source map';
  if (/(^|\/)(src|test|tests|node_modules)\//.test(path)) return 'a source, test or dependency folder';
  if (/\.(ts|tsx|mts|cts)$/.test(path)) return 'TypeScript source';
  if (/(^|\/)\.[^/]*/.test(path)) return 'a hidden file';
  return null;
}

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/**
 * Every problem with one package, as messages naming the field and what is allowed; empty when the
 * package is fit to upload. `version` is package.json's.
 */
export function packageProblems(target: Target, files: readonly PackageFile[], version: string): string[] {
  const problems: string[] = [];
  const byPath = new Map(files.map((f) => [f.path, f.data]));

  for (const f of files) {
    const why = forbiddenPath(f.path);
    if (why) problems.push(`${f.path}: ${why}; allowed: only the built extension and ${STORE_DOCS.join(', ')}`);
  }
  for (const doc of STORE_DOCS) if (!byPath.has(doc)) problems.push(`${doc}: missing; allowed: present at the package root`);

  const raw = byPath.get('manifest.json');
  if (!raw) return [...problems, 'manifest.json: missing; allowed: present at the package root'];
  let m: unknown;
  try {
    m = JSON.parse(Buffer.from(raw).toString('utf8'));
  } catch (e) {
    return [...problems, `manifest.json: not valid JSON (${(e as Error).message})`];
  }
  if (!isRecord(m)) return [...problems, 'manifest.json: not a JSON object'];

  if (m.manifest_version !== 3) problems.push(`manifest_version: got ${JSON.stringify(m.manifest_version)}; allowed: 3`);
  if (m.version !== version) problems.push(`version: got ${JSON.stringify(m.version)}; allowed: ${JSON.stringify(version)} (package.json)`);
  for (const key of ['name', 'description', 'default_locale'] as const) {
    if (typeof m[key] !== 'string' || m[key] === '') problems.push(`${key}: got ${JSON.stringify(m[key])}; allowed: a non-empty string`);
  }
  if (typeof m.default_locale === 'string' && !byPath.has(`_locales/${m.default_locale}/messages.json`)) {
    problems.push(`default_locale: _locales/${m.default_locale}/messages.json is missing`);
  }

  // every icon the manifest names: present, a PNG, and as large as its key says
  const icons: [string, unknown][] = [];
  if (isRecord(m.icons)) icons.push(...Object.entries(m.icons).map(([k, v]): [string, unknown] => [`icons.${k}`, v]));
  else problems.push('icons: missing; allowed: an object of size to PNG path');
  const action = isRecord(m.action) ? m.action : {};
  if (isRecord(action.default_icon)) icons.push(...Object.entries(action.default_icon).map(([k, v]): [string, unknown] => [`action.default_icon.${k}`, v]));
  if (isRecord(m.icons) && !('128' in m.icons)) problems.push('icons.128: missing; allowed: a 128 px PNG (the stores show it)');
  for (const [field, path] of icons) {
    const size = Number(field.slice(field.lastIndexOf('.') + 1));
    const data = typeof path === 'string' ? byPath.get(path) : undefined;
    if (!data) {
      problems.push(`${field}: ${JSON.stringify(path)} is not in the package`);
      continue;
    }
    const png = pngSize(data);
    if (!png) problems.push(`${field}: ${path} is not a PNG`);
    else if (png.width !== size || png.height !== size) problems.push(`${field}: ${path} is ${png.width} x ${png.height} px; allowed: ${size} x ${size}`);
  }

  for (const page of [action.default_popup, isRecord(m.options_ui) ? m.options_ui.page : undefined]) {
    if (typeof page === 'string' && !byPath.has(page)) problems.push(`${page}: named in the manifest but not in the package`);
  }

  // the overlay is injected on request; listing it would let any page probe for the extension
  const war = Array.isArray(m.web_accessible_resources) ? m.web_accessible_resources : [];
  for (const w of war) {
    const resources = isRecord(w) && Array.isArray(w.resources) ? w.resources : [];
    for (const r of resources) if (typeof r === 'string' && r.includes('overlay')) problems.push(`web_accessible_resources: lists ${r}; allowed: no overlay file`);
  }
  if (m.content_scripts !== undefined) problems.push('content_scripts: present; allowed: none (the overlay is injected only on request)');
  if (m.host_permissions !== undefined) problems.push(`host_permissions: ${JSON.stringify(m.host_permissions)}; allowed: none (that is the e2e build)`);

  const bg = isRecord(m.background) ? m.background : {};
  const scripts = Array.isArray(bg.scripts) ? bg.scripts : [];
  if (target === 'chromium') {
    if (typeof bg.service_worker !== 'string' || !byPath.has(bg.service_worker)) problems.push(`background.service_worker: got ${JSON.stringify(bg.service_worker)}; allowed: a script in the package`);
    if ('scripts' in bg) problems.push('background.scripts: present; allowed: only in the Firefox build');
    if ('browser_specific_settings' in m) problems.push('browser_specific_settings: present; allowed: only in the Firefox build');
  } else {
    if (scripts.length === 0 || scripts.some((s) => typeof s !== 'string' || !byPath.has(s))) problems.push(`background.scripts: got ${JSON.stringify(bg.scripts)}; allowed: scripts in the package`);
    if ('service_worker' in bg) problems.push('background.service_worker: present; allowed: background.scripts in Firefox');
    if ('minimum_chrome_version' in m) problems.push('minimum_chrome_version: present; allowed: none in the Firefox build');
    const bss = isRecord(m.browser_specific_settings) ? m.browser_specific_settings : {};
    const gecko = isRecord(bss.gecko) ? bss.gecko : {};
    if (typeof gecko.id !== 'string' || !/^[A-Za-z0-9._-]+@[A-Za-z0-9.-]+$/.test(gecko.id)) problems.push(`browser_specific_settings.gecko.id: got ${JSON.stringify(gecko.id)}; allowed: an email-like add-on id`);
    if (typeof gecko.strict_min_version !== 'string') problems.push('browser_specific_settings.gecko.strict_min_version: missing; allowed: a Firefox version');
    const dcp = isRecord(gecko.data_collection_permissions) ? gecko.data_collection_permissions : {};
    if (JSON.stringify(dcp.required) !== '["none"]') problems.push(`browser_specific_settings.gecko.data_collection_permissions.required: got ${JSON.stringify(dcp.required)}; allowed: ["none"]`);
  }
  return problems;
}
