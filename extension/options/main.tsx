import { render } from 'preact';
import { useEffect, useState } from 'preact/hooks';
import { parseBand, MAX_MARKER_NAME, CAMERA_PROFILES, type Settings } from '../../src/case';
import { message } from '../shared/browser';
import { commitsOnLeave, describedBy, FormField, valueOf } from '../shared/form-field';
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
        <FormField id="system" label={message('optSystemLabel')}>
          <select id="system" data-testid="system" value={s.system} onChange={(e) => save({ ...s, system: valueOf(e) as Settings['system'] })}>
            <option value="metric">{message('optSystemMetric')}</option>
            <option value="imperial">{message('optSystemImperial')}</option>
            <option value="aviation">{message('optSystemAviation')}</option>
          </select>
        </FormField>
        <FormField id="camera" label={message('optCameraLabel')}>
          <select id="camera" data-testid="camera" value={s.cameraProfile} onChange={(e) => save({ ...s, cameraProfile: valueOf(e) })}>
            {CAMERA_PROFILES.map((p) => (
              <option value={p.id}>
                {p.label} ({p.hfovDeg.lo.toFixed(0)}–{p.hfovDeg.hi.toFixed(0)}°)
              </option>
            ))}
          </select>
        </FormField>
        <FormField id="speed" label={message('optSpeedLabel')} error={speedError}>
          <input
            id="speed"
            data-testid="speed"
            value={speed}
            placeholder={message('optSpeedHint')}
            {...describedBy('speed', speedError)}
            onInput={(e) => setSpeed(valueOf(e))}
            {...commitsOnLeave(commitSpeed)}
          />
        </FormField>
        <FormField id="marker-name" label={message('optNameLabel')} error={nameError}>
          <input
            id="marker-name"
            data-testid="marker-name"
            value={name}
            maxLength={MAX_MARKER_NAME + 20}
            placeholder={message('optNameHint')}
            {...describedBy('marker-name', nameError)}
            onInput={(e) => setName(valueOf(e))}
            {...commitsOnLeave(commitName)}
          />
        </FormField>
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
