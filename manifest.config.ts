import { defineManifest } from '@crxjs/vite-plugin';
import pkg from './package.json' with { type: 'json' };

/*
 * No content scripts and no host permissions: the overlay is injected only when the user asks
 * (activeTab grants the current tab for that one gesture). The e2e build alone adds host access,
 * because browser tests cannot make that gesture: `<all_urls>` stands in for activeTab's grant,
 * which screen capture needs (a site's host permission alone does not allow it).
 */
export default defineManifest(({ mode }) => ({
  manifest_version: 3,
  name: '__MSG_extName__',
  description: '__MSG_extDescription__',
  version: pkg.version,
  default_locale: 'en',
  minimum_chrome_version: '120',
  icons: { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png', 48: 'icons/icon-48.png', 128: 'icons/icon-128.png' },
  action: {
    default_title: '__MSG_actionTitle__',
    default_popup: 'extension/popup/index.html',
    default_icon: { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png' },
  },
  background: { service_worker: 'extension/background/index.ts', type: 'module' },
  options_ui: { page: 'extension/options/index.html', open_in_tab: true },
  commands: {
    'measure-video': {
      suggested_key: { default: 'Alt+Shift+M' },
      description: '__MSG_commandMeasure__',
    },
  },
  permissions: ['activeTab', 'scripting', 'storage', 'contextMenus'],
  // asked for one site at a time, only when the user wants a video inside a frame from that site
  optional_host_permissions: ['http://*/*', 'https://*/*'],
  ...(mode === 'e2e' ? { host_permissions: ['<all_urls>'] } : {}),
}));
