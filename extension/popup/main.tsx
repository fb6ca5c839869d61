import { render } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { browser, message as t, send } from '../shared/browser';

function Cautions() {
  return (
    <section class="cautions" aria-label="Cautions">
      <p>{t('cautionDriving')}</p>
      <p>{t('cautionEstimate')}</p>
      <p>{t('cautionPerson')}</p>
    </section>
  );
}

function MeasureButton() {
  const [error, setError] = useState<string | null>(null);
  const measure = async () => {
    setError(null);
    try {
      const [tab] = await browser.tabs.query({ active: true, currentWindow: true });
      if (tab?.id === undefined) throw new Error('no active tab');
      await send('overlay/inject', { tabId: tab.id });
      window.close();
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
      const [tab] = await browser.tabs.query({ active: true, currentWindow: true });
      if (tab?.id === undefined) return;
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
      else window.close();
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
      <footer class="muted" data-testid="version">
        {version ? t('popupVersion', version) : '…'}
      </footer>
    </main>
  );
}

render(<Popup />, document.getElementById('app')!);
