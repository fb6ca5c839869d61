import { render } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { parseBand } from '../../src/case/bands';
import { MAX_MARKER_NAME, type Settings } from '../../src/case/settings';
import { CAMERA_PROFILES } from '../../src/engine/profiles';
import { message } from '../shared/browser';
import { loadSettings, saveSettings } from '../shared/settings';

/** Settings: how figures are shown and what new cases assume. Saved as soon as they change. */
function Options() {
  const [s, setS] = useState<Settings | null>(null);
  const [speed, setSpeed] = useState('');
  const [status, setStatus] = useState('');
  const [speedError, setSpeedError] = useState<string | null>(null);
  const [name, setName] = useState('');
  const [nameError, setNameError] = useState<string | null>(null);
  useEffect(() => {
    loadSettings().then((x) => {
      setS(x);
      setName(x.markerName ?? '');
      setSpeed(x.observerSpeedMs ? `${+(x.observerSpeedMs.lo * 3.6).toPrecision(4)} to ${+(x.observerSpeedMs.hi * 3.6).toPrecision(4)} km/h` : '');
    });
  }, []);
  if (!s) return null;
  const save = (next: Settings) => {
    setS(next);
    saveSettings(next).then(() => setStatus(message('optSaved')), (e: Error) => setStatus(message('optNotSaved', e.message)));
  };
  const commitSpeed = () => {
    if (speed.trim() === '') {
      setSpeedError(null);
      const next = { ...s };
      delete next.observerSpeedMs;
      return save(next);
    }
    try {
      save({ ...s, observerSpeedMs: parseBand(speed, 'speed', message('optSpeedField'), 'km/h') });
      setSpeedError(null);
    } catch (e) {
      setSpeedError((e as Error).message);
    }
  };
  const commitName = () => {
    const v = name.trim();
    if (v.length > MAX_MARKER_NAME) {
      setNameError(message('optNameTooLong', [String(v.length), String(MAX_MARKER_NAME)]));
      return;
    }
    setNameError(null);
    if (v === (s.markerName ?? '')) return;
    const next = { ...s };
    if (v) next.markerName = v;
    else delete next.markerName;
    save(next);
  };
  return (
    <main>
      <h1>{message('optTitle')}</h1>
      <div class="assumptions">
        <div class="field">
          <label for="system">{message('optSystemLabel')}</label>
          <select id="system" data-testid="system" value={s.system} onChange={(e) => save({ ...s, system: (e.target as HTMLSelectElement).value as Settings['system'] })}>
            <option value="metric">{message('optSystemMetric')}</option>
            <option value="imperial">{message('optSystemImperial')}</option>
            <option value="aviation">{message('optSystemAviation')}</option>
          </select>
        </div>
        <div class="field">
          <label for="camera">{message('optCameraLabel')}</label>
          <select id="camera" data-testid="camera" value={s.cameraProfile} onChange={(e) => save({ ...s, cameraProfile: (e.target as HTMLSelectElement).value })}>
            {CAMERA_PROFILES.map((p) => (
              <option value={p.id}>
                {p.label} ({p.hfovDeg.lo.toFixed(0)}–{p.hfovDeg.hi.toFixed(0)}°)
              </option>
            ))}
          </select>
        </div>
        <div class="field">
          <label for="speed">{message('optSpeedLabel')}</label>
          <input
            id="speed"
            data-testid="speed"
            value={speed}
            placeholder={message('optSpeedHint')}
            aria-invalid={speedError ? 'true' : 'false'}
            onInput={(e) => setSpeed((e.target as HTMLInputElement).value)}
            onBlur={commitSpeed}
            onKeyDown={(e) => e.key === 'Enter' && commitSpeed()}
          />
          {speedError && (
            <div class="error" role="alert">
              {speedError}
            </div>
          )}
        </div>
        <div class="field">
          <label for="marker-name">{message('optNameLabel')}</label>
          <input
            id="marker-name"
            data-testid="marker-name"
            value={name}
            maxLength={MAX_MARKER_NAME + 20}
            placeholder={message('optNameHint')}
            aria-invalid={nameError ? 'true' : 'false'}
            onInput={(e) => setName((e.target as HTMLInputElement).value)}
            onBlur={commitName}
            onKeyDown={(e) => e.key === 'Enter' && commitName()}
          />
          {nameError && (
            <div class="error" role="alert">
              {nameError}
            </div>
          )}
        </div>
      </div>
      <p class="muted" role="status">
        {status}
      </p>
      <p class="muted">{message('optPrivacy')}</p>
    </main>
  );
}

// the page's <title> is static HTML; the table's wording replaces it here
document.title = message('optTitle');
render(<Options />, document.getElementById('app')!);
