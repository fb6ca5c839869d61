// Until the demo launcher exists: say where the build is and how to load it by hand.
import { resolve } from 'node:path';
const dist = resolve('dist');
console.log(`Built the extension into ${dist}
Load it in a Chromium-family browser:
  1. open chrome://extensions and switch on Developer mode
  2. choose "Load unpacked" and pick ${dist}
Never operate the tool, or film, while driving.`);
