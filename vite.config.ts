import { defineConfig } from 'vite';
import preact from '@preact/preset-vite';
import { crx } from '@crxjs/vite-plugin';
import manifest from './manifest.config.ts';

export default defineConfig({
  publicDir: 'extension/public',
  plugins: [preact(), crx({ manifest })],
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    // Source maps stay out of the shipped build; the store packages must not carry them.
    sourcemap: false,
    target: 'chrome120',
  },
  server: { strictPort: true },
});
