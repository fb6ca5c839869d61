import { defineConfig, type Plugin } from 'vite';
import preact from '@preact/preset-vite';
import { crx } from '@crxjs/vite-plugin';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import manifest from './manifest.config.ts';

/*
 * crxjs lists every `?script` import in web_accessible_resources, which lets any page probe for the
 * overlay file (and so detect the extension). executeScript does not need it there: drop it.
 */
function dropOverlayFromWebAccessible(): Plugin {
  return {
    name: 'clip-caliper:drop-overlay-war',
    enforce: 'post',
    // after crxjs has written its manifest (it emits it late in its own generateBundle)
    writeBundle(options) {
      const file = join(options.dir ?? 'dist', 'manifest.json');
      const m = JSON.parse(readFileSync(file, 'utf8')) as { web_accessible_resources?: { resources: string[] }[] };
      if (!m.web_accessible_resources) return;
      m.web_accessible_resources = m.web_accessible_resources
        .map((w) => ({ ...w, resources: w.resources.filter((r) => !r.startsWith('extension/overlay/')) }))
        .filter((w) => w.resources.length > 0);
      if (m.web_accessible_resources.length === 0) delete m.web_accessible_resources;
      writeFileSync(file, JSON.stringify(m, null, 2) + '\n');
    },
  };
}

/** Where each mode's build lands: the e2e and Firefox builds never overwrite the shipped dist/. */
export function outDirFor(mode: string): string {
  if (mode === 'e2e') return 'dist-e2e';
  if (mode === 'firefox') return 'dist-firefox';
  return 'dist';
}

export default defineConfig(({ mode }) => {
  const firefox = mode === 'firefox';
  return {
    publicDir: 'extension/public',
    // crxjs's firefox target writes background.scripts (with its loader) instead of a service worker
    plugins: [preact(), crx(firefox ? { manifest, browser: 'firefox' } : { manifest }), dropOverlayFromWebAccessible()],
    build: {
      // the e2e build (host permission for the local test origins) never lands in dist/
      outDir: outDirFor(mode),
      emptyOutDir: true,
      // source maps stay out of the shipped build; the store packages must not carry them
      sourcemap: false,
      // the Firefox floor is the manifest's strict_min_version (manifest.config.ts says why)
      target: firefox ? 'firefox140' : 'chrome120',
    },
    // the popup's analysis worker (extension/popup/use-analysis.ts) is a module worker
    worker: { format: 'es' as const },
    server: { strictPort: true },
  };
});
