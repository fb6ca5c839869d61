import { formatQuantity, type RangePlot, type UnitSystem } from '../../src/case';
import { message } from '../shared/browser';
import { savePicture } from './save-picture';

const W = 440;
const H = 210;
const M = { left: 64, right: 12, top: 10, bottom: 34 };

/** The range-over-time picture, to scale in both axes' units, with a text alternative beside it. */
export function RangePlotView({ p, system }: { p: RangePlot; system: UnitSystem }) {
  const x = (t: number) => M.left + ((t - p.t.min) / (p.t.max - p.t.min)) * (W - M.left - M.right);
  const y = (r: number) => H - M.bottom - ((r - p.range.min) / (p.range.max - p.range.min)) * (H - M.top - M.bottom);
  const path = p.curve.map((c, i) => `${i ? 'L' : 'M'}${x(c.t).toFixed(1)},${y(c.r).toFixed(1)}`).join(' ');
  const save = (format: 'svg' | 'png') => void savePicture(document.getElementById('range-plot') as unknown as SVGSVGElement, 'range-over-time', format);
  return (
    <figure class="plot">
      <svg id="range-plot" xmlns="http://www.w3.org/2000/svg" viewBox={`0 0 ${W} ${H}`} role="img" aria-label={p.description} data-testid="range-plot">
        <rect x="0" y="0" width={W} height={H} fill="none" />
        {p.range.ticks.map((r) => (
          <g>
            <line x1={M.left} x2={W - M.right} y1={y(r)} y2={y(r)} stroke="currentColor" stroke-opacity="0.15" />
            <text x={M.left - 6} y={y(r) + 4} text-anchor="end" font-size="10" fill="currentColor">
              {formatQuantity(r, 'distance', system, 3)}
            </text>
          </g>
        ))}
        {p.t.ticks.map((t) => (
          <text x={x(t)} y={H - M.bottom + 14} text-anchor="middle" font-size="10" fill="currentColor">
            {`${+t.toPrecision(6)} s`}
          </text>
        ))}
        <text x={(M.left + W - M.right) / 2} y={H - 4} text-anchor="middle" font-size="10" fill="currentColor">
          {message('plotTimeAxis')}
        </text>
        <path d={path} fill="none" stroke="#0b63c7" stroke-width="2" data-testid="fit-curve" />
        {p.points.map((q) => (
          <g data-testid="plot-point">
            <line x1={x(q.t)} x2={x(q.t)} y1={y(q.p05)} y2={y(q.p95)} stroke="#e8590c" stroke-width="2" />
            <circle cx={x(q.t)} cy={y(q.median)} r="3.5" fill="#e8590c" />
          </g>
        ))}
      </svg>
      <figcaption class="muted">
        {p.description}{' '}
        <button type="button" class="secondary" onClick={() => save('svg')}>
          {message('plotSaveSvg')}
        </button>{' '}
        <button type="button" class="secondary" onClick={() => save('png')} data-testid="range-png">
          {message('plotSavePng')}
        </button>
      </figcaption>
      <table class="sr">
        <caption>{message('plotTableCaption')}</caption>
        <tbody>
          {p.points.map((q) => (
            <tr>
              <td>{q.t.toFixed(3)} s</td>
              <td>
                {message('plotTableRange', [formatQuantity(q.median, 'distance', system), formatQuantity(q.p05, 'distance', system), formatQuantity(q.p95, 'distance', system)])}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </figure>
  );
}
