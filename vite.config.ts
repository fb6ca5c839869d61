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

export default defineConfig(({ mode }) => ({
  publicDir: 'extension/public',
  plugins: [preact(), crx({ manifest }), dropOverlayFromWebAccessible()],
  build: {
    // the e2e build (host permission for the local test origins) never lands in dist/
    outDir: mode === 'e2e' ? 'dist-e2e' : 'dist',
    emptyOutDir: true,
    // source maps stay out of the shipped build; the store packages must not carry them
    sourcemap: false,
    target: 'chrome120',
  },
  server: { strictPort: true },
}));
