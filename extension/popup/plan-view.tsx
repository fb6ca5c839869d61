import { useState } from 'preact/hooks';
import { planFor, formatQuantity, type PageFigures, type PlanView, type UnitSystem } from '../../src/case';
import { message } from '../shared/browser';
import { savePicture } from './save-picture';
import { valueOf } from '../shared/form-field';

const W = 440;
const H = 240;
const LABELS: Record<PlanView['direction'], string> = {
  opposite: message('planOpposite'),
  'same-slower': message('planSameSlower'),
  'same-faster': message('planSameFaster'),
};

/**
 * The ground from above, to scale (one factor for both axes): the observer's road, the object's
 * track, a sight line per timestamp, and the motionless point they all pass through.
 */
export function PlanViewSvg({ f, system }: { f: PageFigures; system: UnitSystem }) {
  const { r } = f;
  // the pass's readings the marks and the direction assumed leave open (analysis.ts), in its order
  const readings = [...new Set(r.readings.filter((x) => x.pass).map((x) => x.pass!.direction))];
  const [chosen, setDirection] = useState<PlanView['direction'] | undefined>(undefined);
  const direction = chosen && readings.includes(chosen) ? chosen : readings[0];
  const p = planFor(f, direction);
  // a fit none of whose readings fits the direction assumed: no picture to draw that agrees with it
  if (!p || (r.series && p.mode === 'pass' && readings.length === 0)) return null;
  const b = p.bounds;
  const k = Math.min(W / (b.xMax - b.xMin), H / (b.yMax - b.yMin));
  const x = (v: number) => (v - b.xMin) * k + (W - (b.xMax - b.xMin) * k) / 2;
  const y = (v: number) => H - ((v - b.yMin) * k + (H - (b.yMax - b.yMin) * k) / 2);
  const bar = niceLength((b.xMax - b.xMin) / 4);
  return (
    <figure class="plot">
      {readings.length > 1 && (
        <label class="muted">
          {message('planDirectionLabel')}{' '}
          <select value={p.direction} onChange={(e) => setDirection(valueOf(e) as PlanView['direction'])} data-testid="plan-direction">
            {readings.map((d) => (
              <option value={d}>{LABELS[d]}</option>
            ))}
          </select>
        </label>
      )}
      <svg id="plan-view" xmlns="http://www.w3.org/2000/svg" viewBox={`0 0 ${W} ${H}`} role="img" aria-label={p.description} data-testid="plan-view">
        <rect
          data-testid="track-band"
          x="0"
          width={W}
          y={y(p.trackBand.hi)}
          height={Math.max(y(p.trackBand.lo) - y(p.trackBand.hi), 1)}
          fill="#e8590c"
          fill-opacity="0.12"
        >
          <title>
            {message('planTrackBand', [formatQuantity(p.trackBand.lo, 'distance', system), formatQuantity(p.trackBand.hi, 'distance', system)])}
          </title>
        </rect>
        <line x1="0" x2={W} y1={y(0)} y2={y(0)} stroke="currentColor" stroke-width="3" stroke-opacity="0.5" />
        <text x="4" y={y(0) - 5} font-size="10" fill="currentColor">
          {message('planRoad')}
        </text>
        <line x1="0" x2={W} y1={y(p.trackDistance)} y2={y(p.trackDistance)} stroke="#e8590c" stroke-dasharray="6 4" />
        <text x="4" y={y(p.trackDistance) - 5} font-size="10" fill="currentColor">
          {message('planTrack', formatQuantity(p.trackDistance, 'distance', system))}
        </text>
        {p.sightLines.map((l) => (
          <g data-testid="sight-line" data-x1={l.observer.x} data-y1={l.observer.y} data-x2={l.object.x} data-y2={l.object.y}>
            <line x1={x(l.observer.x)} y1={y(l.observer.y)} x2={x(l.object.x)} y2={y(l.object.y)} stroke="#0b63c7" stroke-opacity="0.7" />
            <circle cx={x(l.observer.x)} cy={y(l.observer.y)} r="3" fill="#0b63c7" />
            <circle cx={x(l.object.x)} cy={y(l.object.y)} r="3" fill="#e8590c" />
          </g>
        ))}
        {p.fixedPoint && (
          <g data-testid="fixed-point" data-x={p.fixedPoint.x} data-y={p.fixedPoint.y}>
            <circle cx={x(p.fixedPoint.x)} cy={y(p.fixedPoint.y)} r="5" fill="none" stroke="#2b8a3e" stroke-width="2" />
            {/* the label on whichever side of the point has room */}
            <text
              x={x(p.fixedPoint.x) < W * 0.4 ? x(p.fixedPoint.x) + 8 : x(p.fixedPoint.x) - 8}
              text-anchor={x(p.fixedPoint.x) < W * 0.4 ? 'start' : 'end'}
              y={y(p.fixedPoint.y) + 4}
              font-size="10"
              fill="currentColor"
            >
              {message(p.mode === 'single' ? 'planLandmarkPoint' : 'planFixedPoint', formatQuantity(p.fixedPoint.fromRoad, 'distance', system))}
            </text>
          </g>
        )}
        <line x1={W - 12 - bar * k} x2={W - 12} y1={H - 8} y2={H - 8} stroke="currentColor" stroke-width="2" />
        <text x={W - 12} y={H - 12} font-size="10" text-anchor="end" fill="currentColor">
          {formatQuantity(bar, 'distance', system)}
        </text>
      </svg>
      <figcaption class="muted">
        {p.description} {message('planCaption')}{' '}
        <button type="button" class="secondary" onClick={() => void savePicture(document.getElementById('plan-view') as unknown as SVGSVGElement, 'plan-view', 'svg')} data-testid="plan-svg">
          {message('planSaveSvg')}
        </button>{' '}
        <button type="button" class="secondary" onClick={() => void savePicture(document.getElementById('plan-view') as unknown as SVGSVGElement, 'plan-view', 'png')} data-testid="plan-png">
          {message('planSavePng')}
        </button>
      </figcaption>
    </figure>
  );
}

function niceLength(v: number): number {
  const mag = 10 ** Math.floor(Math.log10(v));
  return [1, 2, 5, 10].map((m) => m * mag).reverse().find((s) => s <= v) ?? mag;
}
