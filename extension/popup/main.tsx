import { render } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { message as t, send } from '../shared/browser';

function Cautions() {
  return (
    <section class="cautions" aria-label="Cautions">
      <p>{t('cautionDriving')}</p>
      <p>{t('cautionEstimate')}</p>
      <p>{t('cautionPerson')}</p>
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
      <p class="muted">{t('popupNoCase')}</p>
      <footer class="muted" data-testid="version">
        {version ? t('popupVersion', version) : '…'}
      </footer>
    </main>
  );
}

render(<Popup />, document.getElementById('app')!);
