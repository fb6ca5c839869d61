import { browser, extensionVersion } from '../shared/browser';
import { routeMessages } from './router';

// Storage schema version; the case model (src/case) owns migrations once it exists.
const SCHEMA_VERSION = 1;

browser.runtime.onMessage.addListener(
  routeMessages({
    'status/get': async () => ({ version: extensionVersion(), schema: SCHEMA_VERSION }),
  }),
);
