import { useState } from 'preact/hooks';
import { parseBand, hfovFromEquivalentFocal, CAMERA_PROFILES, profileHfovRad, CODE_LETTERS, OTHER_SIZE_CLASSES, type CaseAssumptions } from '../../src/case';
import { message } from '../shared/browser';
import { FormField, valueOf } from '../shared/form-field';

/*
 * The assumptions that are chosen rather than typed: a camera class or a focal length, a size class,
 * the direction of travel and the camera's mount. Each writes the same stored fields the typed ones
 * do (field of view in degrees, size in metres), with a label saying where the values came from.
 */
const DEG = Math.PI / 180;
type Save = (next: CaseAssumptions) => void;

const round = (x: number, digits = 4) => +x.toPrecision(digits);

export function CameraPicker({ a, onSave }: { a: CaseAssumptions; onSave: Save }) {
  const current = CAMERA_PROFILES.find((p) => p.label === a.cameraLabel)?.id ?? '';
  return (
    <FormField id="field-camera" label={message('pickCameraLabel')}>
      <select
        id="field-camera"
        data-testid="field-camera"
        value={current}
        onChange={(e) => {
          const id = valueOf(e);
          const p = CAMERA_PROFILES.find((x) => x.id === id);
          if (!p) return;
          const h = profileHfovRad(p);
          onSave({ ...a, cameraLabel: p.label, hfovDeg: { lo: round(h.lo / DEG), hi: round(h.hi / DEG) } });
        }}
      >
        <option value="">{current ? '' : message('pickAsGiven', a.cameraLabel)}</option>
        {CAMERA_PROFILES.map((p) => (
          <option value={p.id} title={p.basis}>
            {p.label} ({p.hfovDeg.lo.toFixed(0)}–{p.hfovDeg.hi.toFixed(0)}°)
          </option>
        ))}
      </select>
      <FocalForm a={a} onSave={onSave} />
    </FormField>
  );
}

/** The field of view from a 35 mm-equivalent focal length, digital zoom, stabilisation crop and orientation. */
function FocalForm({ a, onSave }: { a: CaseAssumptions; onSave: Save }) {
  const [focal, setFocal] = useState('');
  const [zoom, setZoom] = useState('1');
  const [crop, setCrop] = useState('0');
  const [portrait, setPortrait] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const apply = () => {
    try {
      const f = parseBand(focal, 'length', message('pickFocalField'), 'mm');
      const z = Number(zoom);
      const c = Number(crop);
      if (!(z >= 1 && z <= 100)) throw new Error(message('pickZoomOutside', zoom));
      if (!(c >= 0 && c <= 90)) throw new Error(message('pickCropOutside', crop));
      const mm = (x: number) => x * 1000;
      if (!(mm(f.lo) >= 8 && mm(f.hi) <= 2000)) throw new Error(message('pickFocalOutside', [message('pickFocalField'), focal]));
      const opts = { zoom: z, stabilisationCrop: c / 100, orientation: portrait ? ('portrait' as const) : ('landscape' as const) };
      // the longer focal length gives the narrower field
      const lo = hfovFromEquivalentFocal({ ...opts, focalEq: mm(f.hi) }) / DEG;
      const hi = hfovFromEquivalentFocal({ ...opts, focalEq: mm(f.lo) }) / DEG;
      setError(null);
      const fl = f.lo === f.hi ? `${round(mm(f.lo), 3)}` : `${round(mm(f.lo), 3)}-${round(mm(f.hi), 3)}`;
      onSave({
        ...a,
        cameraLabel: `35 mm-equivalent ${fl} mm, zoom ${z}x, crop ${c} %, ${portrait ? 'portrait' : 'landscape'}`,
        hfovDeg: { lo: round(lo), hi: round(hi) },
      });
    } catch (e) {
      setError((e as Error).message);
    }
  };
  return (
    <details class="focal">
      <summary>{message('pickFocalSummary')}</summary>
      <div class="focal-grid">
        <label>
          {message('pickFocalLabel')}
          <input data-testid="focal-mm" value={focal} placeholder={message('pickFocalHint')} aria-invalid={error ? 'true' : 'false'} onInput={(e) => setFocal(valueOf(e))} />
        </label>
        <label>
          {message('pickZoomLabel')}
          <input data-testid="focal-zoom" value={zoom} inputMode="decimal" onInput={(e) => setZoom(valueOf(e))} />
        </label>
        <label>
          {message('pickCropLabel')}
          <input data-testid="focal-crop" value={crop} inputMode="decimal" onInput={(e) => setCrop(valueOf(e))} />
        </label>
        <label class="check">
          <input type="checkbox" checked={portrait} onChange={(e) => setPortrait((e.target as HTMLInputElement).checked)} /> {message('pickPortrait')}
        </label>
      </div>
      <button type="button" class="secondary" data-testid="focal-apply" onClick={apply}>
        {message('pickUseFov')}
      </button>
      {error && (
        <div class="error" role="alert">
          {error}
        </div>
      )}
    </details>
  );
}

/** Size classes: the aerodrome code letters (wingspan or length) and the other objects such clips show. */
export function SizePicker({ a, onSave, dimension }: { a: CaseAssumptions; onSave: Save; dimension: 'wingspan' | 'length' }) {
  const options = [
    ...CODE_LETTERS.map((c) => ({ id: `letter-${c.letter}`, label: `${c.label}, ${dimension} ${c[dimension].lo}-${c[dimension].hi} m`, band: c[dimension], kind: 'fixed-wing-transport' as const, letter: c.letter })),
    ...OTHER_SIZE_CLASSES.map((o) => ({ id: `other-${o.id}`, label: `${o.label}, ${o.dimension} ${o.lo}-${o.hi} m`, band: o, kind: o.id === 'helicopter' ? ('rotorcraft' as const) : ('unknown' as const), letter: null })),
  ];
  const current = options.find((o) => o.label === a.sizeLabel)?.id ?? '';
  return (
    <FormField id="field-size-class" label={message('pickSizeLabel')}>
      <select
        id="field-size-class"
        data-testid="field-size-class"
        value={current}
        onChange={(e) => {
          const o = options.find((x) => x.id === valueOf(e));
          if (!o) return;
          // code letter A is a light aircraft; B and above fly transport-like approach speeds
          const kind = o.letter ? (o.letter === 'A' ? 'fixed-wing-light' : 'fixed-wing-transport') : o.kind;
          const next: CaseAssumptions = { ...a, sizeLabel: o.label, objectSizeM: { lo: o.band.lo, hi: o.band.hi }, objectKind: kind };
          // a code letter's band is a wingspan or a length; the other classes are measured their own way
          if (o.letter) next.sizeDimension = dimension;
          else delete next.sizeDimension;
          onSave(next);
        }}
      >
        <option value="">{current ? '' : message('pickAsGiven', a.sizeLabel)}</option>
        {options.map((o) => (
          <option value={o.id} title={o.band.source}>
            {o.label}
          </option>
        ))}
      </select>
    </FormField>
  );
}

export function DirectionPicker({ a, onSave }: { a: CaseAssumptions; onSave: Save }) {
  return (
    <FormField id="field-direction" label={message('pickDirectionLabel')}>
      <select
        id="field-direction"
        data-testid="field-direction"
        value={a.direction ?? 'unknown'}
        onChange={(e) => onSave({ ...a, direction: valueOf(e) as NonNullable<CaseAssumptions['direction']> })}
      >
        <option value="unknown">{message('pickDirectionUnknown')}</option>
        <option value="opposite">{message('pickDirectionOpposite')}</option>
        <option value="same">{message('pickDirectionSame')}</option>
        <option value="same-slower">{message('pickDirectionSameSlower')}</option>
        <option value="same-faster">{message('pickDirectionSameFaster')}</option>
      </select>
    </FormField>
  );
}

export function MountPicker({ a, onSave }: { a: CaseAssumptions; onSave: Save }) {
  const value = a.fixedCamera?.mount ?? 'hand';
  return (
    <FormField id="field-mount" label={message('pickMountLabel')}>
      <select
        id="field-mount"
        data-testid="field-mount"
        value={value}
        onChange={(e) => {
          const v = valueOf(e);
          const next = { ...a };
          // the aim starts as anywhere ahead, shown as the default until the road ahead is marked or an aim given
          if (v === 'tripod' || v === 'vehicle') next.fixedCamera = { ...a.fixedCamera, mount: v, axisHeadingDeg: a.fixedCamera?.axisHeadingDeg ?? { lo: -90, hi: 90 } };
          else delete next.fixedCamera;
          onSave(next);
        }}
      >
        <option value="hand">{message('pickMountHand')}</option>
        <option value="tripod">{message('pickMountTripod')}</option>
        <option value="vehicle">{message('pickMountVehicle')}</option>
      </select>
    </FormField>
  );
}
