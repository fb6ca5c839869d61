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
      <footer class="muted" data-testid="version">
        {version ? t('popupVersion', version) : '…'}
      </footer>
    </main>
  );
}

render(<Popup />, document.getElementById('app')!);
