/*
 * `npm start`: the main job in one command. After the build (the npm script runs it first), this
 * serves a local demo page with an invented clip and opens a Chromium-family browser with the
 * extension loaded on it. Without a display it says so; `npm start -- --headless` then runs the
 * same job unattended (calls the overlay up, marks the clip at its ground-truth pixels, sets the
 * assumptions a reviewer would type) and prints the summary text, checked against the clip's truth.
 *
 * Scripts sent into pages are strings: run through tsx, a function would carry helper names the
 * page does not have.
 */
import { spawn, execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { analyseCase, summaryText, type CaseRecord } from '../../src/case';
import { startServer } from './static-server';
import { ovl } from './overlay-world';
import { demoAssumptions, markObjectAndLandmark } from './demo-flow';

const headless = process.argv.includes('--headless');
const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as { version: string };

function findBrowser(): string | null {
  const candidates = [
    process.env.CHROME_PATH,
    '/usr/bin/chromium',
    '/usr/bin/chromium-browser',
    '/usr/bin/google-chrome',
    '/usr/bin/google-chrome-stable',
    '/Applications/Chromium.app/Contents/MacOS/Chromium',
    '/Applications/Google Chrome.app/Contents/MacOS/Google Chrome',
    'C:\\Program Files\\Google\\Chrome\\Application\\chrome.exe',
  ];
  return candidates.find((c) => c && existsSync(c)) ?? null;
}

const hasDisplay = () => process.platform === 'darwin' || process.platform === 'win32' || !!process.env.DISPLAY || !!process.env.WAYLAND_DISPLAY;

const CAUTION = 'Never operate the tool, or film, while driving. Figures are estimates from a picture, not evidence.';

async function withScreen(browserPath: string): Promise<void> {
  const server = await startServer('extension/demo');
  const dist = resolve('dist');
  const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-demo-'));
  const url = server.url('/index.html');
  console.log(`Demo page: ${url}\nOpening ${browserPath} with the extension from ${dist}.\n${CAUTION}`);
  const child = spawn(browserPath, [`--disable-extensions-except=${dist}`, `--load-extension=${dist}`, `--user-data-dir=${profile}`, '--no-first-run', '--no-default-browser-check', url], {
    stdio: 'ignore',
  });
  await new Promise<void>((ok) => child.on('exit', () => ok()));
  await server.close();
  rmSync(profile, { recursive: true, force: true });
}

interface Truth {
  landmarks: { id: string; sizeM: number }[];
  frames: { t: number; object: Record<'x1' | 'y1' | 'x2' | 'y2', number>; landmarks: ({ id: string } & Record<'x1' | 'y1' | 'x2' | 'y2', number>)[]; objectRange: number; objectSpeed: number }[];
}

async function unattended(browserPath: string): Promise<number> {
  const { chromium } = await import('playwright-core');
  console.log('Building the unattended build (dist-e2e: stands in for the toolbar click a script cannot make)...');
  execFileSync('node_modules/.bin/vite', ['build', '--mode', 'e2e', '--logLevel', 'warn'], { stdio: 'inherit' });
  const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8')) as Truth;
  const frame = truth.frames[1]!;
  const mast = frame.landmarks.find((l) => l.id === 'mast')!;
  const mastSize = truth.landmarks.find((l) => l.id === 'mast')!.sizeM;
  const server = await startServer('extension/demo');
  const dist = resolve('dist-e2e');
  const profile = mkdtempSync(join(tmpdir(), 'clip-caliper-demo-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: browserPath,
    headless: true,
    args: [`--disable-extensions-except=${dist}`, `--load-extension=${dist}`, '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
  try {
    const worker = context.serviceWorkers()[0] ?? (await context.waitForEvent('serviceworker'));
    const extensionId = new URL(worker.url()).host;
    const page = await context.newPage();
    await page.setViewportSize({ width: 1100, height: 700 });
    await page.goto(server.url('/index.html'));
    await page.waitForFunction('(() => { const v = document.querySelector("video"); return v && v.readyState >= 2; })()');
    await page.evaluate(`new Promise((ok) => { const v = document.querySelector("video"); v.pause(); v.addEventListener("seeked", () => ok(), { once: true }); v.currentTime = ${frame.t}; })`);
    console.log(`Paused the invented clip at ${frame.t.toFixed(3)} s.`);

    const ext = await context.newPage();
    await ext.goto(`chrome-extension://${extensionId}/extension/popup/index.html`);
    const ask = (type: string, payload: unknown) =>
      ext.evaluate(`chrome.runtime.sendMessage(${JSON.stringify({ channel: 'clip-caliper', type, payload })})`) as Promise<{ ok: boolean; value: unknown; error?: string }>;
    const tabId = (await ext.evaluate(`chrome.tabs.query({}).then((t) => t.find((x) => x.url === ${JSON.stringify(page.url())}).id)`)) as number;
    await page.bringToFront();
    await ask('overlay/inject', { tabId });
    await ovl(page).until('[data-testid=readout]', /\d+ marks? saved/);
    console.log('Called the overlay up.');

    await markObjectAndLandmark(page, frame.object, mast);
    await ovl(page).until('[data-testid=readout]', /2 marks saved/);
    console.log('Marked the aircraft’s wingtips and the mast at their true pixels (the ends snapped to the edges).');

    const cases = (await ext.evaluate(`chrome.storage.local.get(null)`)) as Record<string, CaseRecord>;
    const c0 = Object.values(cases).find((c) => c?.video?.pageUrl === page.url())!;
    // what a reviewer would type in the popup for this clip
    const assumed = await ask('case/assume', { caseId: c0.id, assumptions: demoAssumptions(mastSize) });
    if (!assumed.ok) throw new Error(assumed.error);
    const c = assumed.value as CaseRecord;
    console.log('Set the assumptions: field of view 39-41 deg, wingspan 31-33 m, mast ±10 %, 90 km/h ± 4.\n');

    const analysis = analyseCase(c);
    console.log(summaryText(c, analysis, { format: 'text', system: 'metric', toolVersion: pkg.version }));

    // the check a newcomer can trust: the figures against the invented scene's ground truth
    const ts = analysis.timestamps[0]!;
    const range = ts.result.range;
    const speed = ts.result.impliedSpeed!;
    const checks = [
      ['true range inside its interval', frame.objectRange >= range.p05 && frame.objectRange <= range.p95],
      ['range within 5 % of the truth', Math.abs(range.median - frame.objectRange) / frame.objectRange < 0.05],
      ['true speed inside its interval', frame.objectSpeed >= speed.p05 && frame.objectSpeed <= speed.p95],
    ] as const;
    console.log('Check against the invented scene’s truth:');
    for (const [what, ok] of checks) console.log(`  ${ok ? 'ok  ' : 'FAIL'} ${what}`);
    return checks.every(([, ok]) => ok) ? 0 : 1;
  } finally {
    await context.close();
    await server.close();
    rmSync(profile, { recursive: true, force: true });
  }
}

const browserPath = findBrowser();
if (!browserPath) {
  console.error(`No Chromium-family browser found (set CHROME_PATH, or install one: on Debian, apt-get install -y chromium).
You can also load the extension by hand: open chrome://extensions, switch on Developer mode,
choose "Load unpacked" and pick ${resolve('dist')}. The demo page is extension/demo/index.html.`);
  process.exit(1);
}
if (headless) {
  process.exit(await unattended(browserPath));
} else if (!hasDisplay()) {
  console.error(`No display here, so no browser window can open.
Run the same demo without a screen:  npm start -- --headless
(it calls the overlay up on the invented clip, marks it, and prints the summary, checked against the truth).`);
  process.exit(2);
} else {
  await withScreen(browserPath);
}
