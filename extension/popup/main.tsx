import type { CaseRecord, Settings } from '../../src/case';
import { render } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { browser, message as t, send } from '../shared/browser';
import { firstStage, injectOverlay } from '../background/call-up';
import { afterNextFrame } from '../shared/next-frame';
import { subscribe } from '../shared/subscribe';
import type { CaseView as CaseViewComponent } from './case-view';
import { LogView, isLogRoute } from './log';
import { followAddress, isFollowRoute } from '../follow/route';
import { DEFAULT_SETTINGS, loadSettings, onSettingsChanged } from '../shared/settings';

function Cautions() {
  return (
    <section class="cautions" aria-label="Cautions">
      <p>{t('cautionDriving')}</p>
      <p>{t('cautionEstimate')}</p>
      <p>{t('cautionPerson')}</p>
    </section>
  );
}

// The e2e build lets the browser tests and the bench call the overlay up exactly as the button
// below does (nothing can click the toolbar in a test); the shipped build has no such door.
if (import.meta.env.MODE === 'e2e') {
  (globalThis as { clipCaliperE2E?: unknown }).clipCaliperE2E = {
    callUp: injectOverlay,
    firstStage,
    afterNextFrame,
    // frames as the follower's page will read them (issue 15), returned whole for the test to check
    readPageFrame: (tabId: number, frameId: number, req: import('../shared/frames').FrameRequest) =>
      import('../follow/page-frames').then((m) => m.readPageFrame(tabId, frameId, req)).then(
        (f) => ({ ...f, gray: { ...f.gray, data: Array.from(f.gray.data) } }),
        (e: { reason?: string; message: string }) => ({ error: e.reason ?? e.message }),
      ),
  };
}

function MeasureButton() {
  const [error, setError] = useState<string | null>(null);
  const measure = async () => {
    setError(null);
    try {
      const tab = await targetTab();
      if (!tab) throw new Error('no active tab');
      await injectOverlay(tab.id);
      await doneWith(tab.id);
    } catch (e) {
      setError(t('popupInjectFailed', (e as Error).message));
    }
  };
  return (
    <section>
      <button type="button" class="primary" onClick={measure} data-testid="measure">
        {t('popupMeasure')}
      </button>
      <p class="muted">{t('popupMeasureHint')}</p>
      {error && (
        <p class="error" role="alert">
          {error}
        </p>
      )}
    </section>
  );
}

/**
 * Videos inside frames from another site: the top page cannot reach them, and the extension holds
 * no host permission by default. The user grants one site at a time, here, with a reason shown.
 */
function ForeignFrames() {
  const [tabId, setTabId] = useState<number | null>(null);
  const [origins, setOrigins] = useState<string[]>([]);
  const [status, setStatus] = useState<string | null>(null);
  useEffect(() => {
    (async () => {
      const tab = await targetTab();
      if (!tab) return;
      setTabId(tab.id);
      const { origins: found } = await send('frames/foreign', { tabId: tab.id });
      setOrigins(found);
    })().catch(() => setOrigins([]));
  }, []);
  if (tabId === null || origins.length === 0) return null;
  const allow = async (origin: string) => {
    setStatus(null);
    try {
      const granted = await browser.permissions.request({ origins: [`${origin}/*`] });
      if (!granted) {
        setStatus(t('popupFrameDeclined', origin));
        return;
      }
      const { frames } = await send('overlay/inject-origin', { tabId, origin });
      if (frames === 0) setStatus(t('popupFrameNoVideo', origin));
      else await doneWith(tabId);
    } catch (e) {
      setStatus(t('popupInjectFailed', (e as Error).message));
    }
  };
  return (
    <section aria-label={t('popupFramesHeading')}>
      <h2>{t('popupFramesHeading')}</h2>
      <p class="muted">{t('popupFramesWhy')}</p>
      {origins.map((o) => (
        <button type="button" class="secondary" onClick={() => allow(o)} data-origin={o}>
          {t('popupFrameAllow', o)}
        </button>
      ))}
      {status && <p role="status">{status}</p>}
    </section>
  );
}

/**
 * The tab this view is about: the one named in the address (the same view opened in a full tab,
 * `?tab=ID`), else the active tab the popup was opened over.
 */
async function targetTab(): Promise<{ id: number; url: string } | null> {
  const param = viewedTab();
  const tab = param ? await browser.tabs.get(Number(param)) : (await browser.tabs.query({ active: true, currentWindow: true }))[0];
  return tab?.id !== undefined && tab.url ? { id: tab.id, url: tab.url } : null;
}

/** The tab named in the address when this view is open in a full tab (`?tab=ID`), else null. */
function viewedTab(): string | null {
  return new URLSearchParams(location.search).get('tab');
}

/**
 * After calling the overlay up: the popup closes over its page; the view in a full tab stays open
 * (it follows the marks as they are saved) and brings the measured tab forward.
 */
async function doneWith(tabId: number): Promise<void> {
  if (viewedTab()) await browser.tabs.update(tabId, { active: true });
  else window.close();
}

/**
 * The case view, loaded on first use: it carries the engine and the units layer (mathjs), which the
 * log view and a popup over a page with no case do not need before they draw.
 */
function useCaseView(): typeof CaseViewComponent | null {
  const [view, setView] = useState<typeof CaseViewComponent | null>(null);
  useEffect(() => {
    void import('./case-view').then((m) => setView(() => m.CaseView));
  }, []);
  return view;
}

/** Opens the follow page in a tab of its own, from the case's latest hand-marked object span. */
function FollowLink({ c, tabId }: { c: CaseRecord; tabId: number }) {
  const seed = c.marks.filter((m) => m.kind === 'object-span' && !m.followed).at(-1);
  if (!seed) return null;
  const url = followAddress(location.href, tabId, 0, c.id, seed.id);
  return (
    <p>
      <a href={url} data-testid="open-follow" onClick={(e) => { e.preventDefault(); void browser.tabs.create({ url }); }}>
        {t('popupFollow')}
      </a>
    </p>
  );
}

/** The measured cases of the tab's page; follows the background's notices, so marks and edits appear as they are saved. */
function Cases() {
  const CaseView = useCaseView();
  const [cases, setCases] = useState<CaseRecord[] | null>(null);
  const [unreadable, setUnreadable] = useState(0);
  const [tabId, setTabId] = useState<number | null>(null);
  const [settings, setSettings] = useState<Settings>(DEFAULT_SETTINGS);
  useEffect(() => {
    void loadSettings().then(setSettings);
    return onSettingsChanged(setSettings);
  }, []);
  useEffect(() => {
    let url = '';
    const load = () =>
      send('cases/forPage', { pageUrl: url }).then((r) => {
        setCases(r.cases);
        setUnreadable(r.unreadable);
      });
    const stop = new AbortController();
    targetTab().then((tab) => {
      if (!tab) return setCases([]);
      url = tab.url;
      setTabId(tab.id);
      void load();
      // the page's cases as a whole (some may be unreadable): asked again on any stored change
      subscribe('cases/changed', () => void load(), stop.signal);
    });
    return () => stop.abort();
  }, []);
  if (cases === null || (cases.length > 0 && !CaseView)) return null;
  return (
    <section>
      {cases.length === 0 || !CaseView ? <p class="muted">{t('popupNoCase')}</p> : cases.map((c) => <CaseView key={c.id} c={c} system={settings.system} tabId={tabId} />)}
      {tabId !== null && cases.map((c) => <FollowLink key={`f-${c.id}`} c={c} tabId={tabId} />)}
      {unreadable > 0 && <p class="error">{t('popupUnreadable', String(unreadable))}</p>}
    </section>
  );
}

function Popup() {
  const [version, setVersion] = useState<string | null>(null);
  useEffect(() => {
    send('status/get', {}).then((s) => setVersion(s.version), () => setVersion(null));
  }, []);
  return (
    <main>
      <h1>{t('popupHeading')}</h1>
      <Cautions />
      <MeasureButton />
      <ForeignFrames />
      <Cases />
      <p>
        {/* the log needs room: it opens in a tab of its own, the same page with ?view=log */}
        <a href="?view=log" data-testid="open-log" onClick={(e) => { e.preventDefault(); void browser.tabs.create({ url: new URL('?view=log', location.href).href }); }}>
          {t('popupOpenLog')}
        </a>
      </p>
      <p class="muted">
        <a href="#" onClick={(e) => { e.preventDefault(); void browser.runtime.openOptionsPage(); }}>
          {t('popupSettingsLink')}
        </a>
      </p>
      <footer class="muted" data-testid="version">
        {version ? t('popupVersion', version) : '…'}
      </footer>
    </main>
  );
}

/** The follow page, loaded only when its address asks for it (it carries the follower's worker). */
function FollowPage() {
  const [view, setView] = useState<(() => preact.JSX.Element) | null>(null);
  useEffect(() => {
    void import('../follow/view').then((m) => setView(() => m.FollowView));
  }, []);
  const View = view;
  return View ? <View /> : null;
}

render(isLogRoute() ? <LogView /> : isFollowRoute() ? <FollowPage /> : <Popup />, document.getElementById('app')!);
