import { defineManifest } from '@crxjs/vite-plugin';
import pkg from './package.json' with { type: 'json' };

/*
 * Our own add-on id for Firefox. The domain is invented (`.example` is reserved for examples by
 * RFC 2606 and can never belong to anyone), so the id cannot collide with someone else's add-on.
 */
export const GECKO_ID = 'clip-caliper@invented.example';

/*
 * Firefox 140 is the first desktop release that reads `data_collection_permissions` (Firefox's
 * built-in data consent, extensionworkshop.com "Firefox built-in consent for data collection and
 * transmission"), and that declaration is required for new add-ons on addons.mozilla.org from
 * November 2025. Every other key we use (MV3 background scripts, scripting, optional host
 * permissions) is older than that. 140 is also an extended-support release.
 */
export const GECKO_MIN_VERSION = '140.0';

const ICONS = { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png', 48: 'icons/icon-48.png', 128: 'icons/icon-128.png' };
/*
 * Firefox's add-ons manager picks by size and screen density (MDN, manifest.json `icons`: a main
 * icon with a double-size one for high-density screens, 32/64 and 48/96), so it gets those too.
 * Chromium's list stays at the documented 16/32/48/128.
 */
const FIREFOX_ICONS = { ...ICONS, 64: 'icons/icon-64.png', 96: 'icons/icon-96.png' };

/*
 * No content scripts and no host permissions: the overlay is injected only when the user asks
 * (activeTab grants the current tab for that one gesture). The e2e build alone adds host access,
 * because browser tests cannot make that gesture: `<all_urls>` stands in for activeTab's grant,
 * which screen capture needs (a site's host permission alone does not allow it).
 *
 * The firefox build differs only where Firefox needs it: background scripts instead of a service
 * worker (Firefox's MV3 runs the background as an event page; crxjs writes the loader's name in),
 * no `minimum_chrome_version`, and `browser_specific_settings.gecko` with our id, the minimum
 * version and "no data collected".
 */
export default defineManifest(({ mode }) => {
  const firefox = mode === 'firefox';
  return {
    manifest_version: 3,
    name: '__MSG_extName__',
    description: '__MSG_extDescription__',
    version: pkg.version,
    default_locale: 'en',
    ...(firefox ? {} : { minimum_chrome_version: '120' }),
    icons: firefox ? FIREFOX_ICONS : ICONS,
    action: {
      default_title: '__MSG_actionTitle__',
      default_popup: 'extension/popup/index.html',
      default_icon: { 16: 'icons/icon-16.png', 32: 'icons/icon-32.png' },
    },
    background: firefox
      ? { scripts: ['extension/background/index.ts'], type: 'module' }
      : { service_worker: 'extension/background/index.ts', type: 'module' },
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
    ...(firefox
      ? {
          browser_specific_settings: {
            gecko: {
              id: GECKO_ID,
              strict_min_version: GECKO_MIN_VERSION,
              // nothing is collected or sent anywhere: cases stay in the browser's local storage
              data_collection_permissions: { required: ['none' as const] },
            },
            // Firefox for Android reads data_collection_permissions from 142 (same source); web-ext
            // lint warns without this floor. Android itself is untried: it lacks commands and menus.
            gecko_android: { strict_min_version: '142.0' },
          },
        }
      : {}),
  };
});
