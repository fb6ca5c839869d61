import { describe, expect, it } from 'vitest';
import { centreAcross } from '../../src/engine/span-across';
import { renderPolygons, type Pt } from './silhouette';

/*
 * Centring a span's ends across its line, on invented shapes rendered with the exact area each
 * pixel covers (silhouette.ts): a tilted bar whose axis is known exactly, with a fin standing on
 * one side near one end. The ends start 0.6 px off the axis; the axis is the truth.
 */

const W = 80;
const H = 60;
// the axis from (15, 25) to (65, 33): a bar 4 px thick about it
const a = { x: 15, y: 25 };
const b = { x: 65, y: 33 };
const L = Math.hypot(b.x - a.x, b.y - a.y);
const ux = (b.x - a.x) / L;
const uy = (b.y - a.y) / L;
const nx = -uy;
const ny = ux;
const at = (s: number, t: number): Pt => [a.x + s * ux + t * nx, a.y + s * uy + t * ny];
const bar: Pt[] = [at(0, -2), at(L, -2), at(L, 2), at(0, 2)];
const across = (p: { x: number; y: number }, q: { x: number; y: number }) => (p.x - q.x) * nx + (p.y - q.y) * ny;

describe('centring the ends across the span', () => {
  it('puts ends placed 0.6 px off back on the axis of a symmetric bar (within 0.05 px)', () => {
    const img = renderPolygons([bar], { width: W, height: H, blur: 0.8 });
    for (const off of [-0.6, 0.6]) {
      const [p, q] = centreAcross(img, { x: a.x + off * nx, y: a.y + off * ny }, { x: b.x + off * nx, y: b.y + off * ny });
      expect(Math.abs(across(p, a))).toBeLessThan(0.05);
      expect(Math.abs(across(q, b))).toBeLessThan(0.05);
    }
  });

  it('leaves an end alone where something wide stands on one side (a fin), rather than be pulled', () => {
    const fin: Pt[] = [at(L - 6, 2), at(L - 0.5, 2), at(L - 2, 14), at(L - 8, 14)];
    const img = renderPolygons([bar, fin], { width: W, height: H, blur: 0.8 });
    const q0 = { x: b.x + 0.6 * nx, y: b.y + 0.6 * ny };
    const [p, q] = centreAcross(img, { x: a.x + 0.6 * nx, y: a.y + 0.6 * ny }, q0);
    expect(Math.abs(across(p, a))).toBeLessThan(0.05);
    // not moved toward the fin: either left as it was or centred on the bar
    expect(across(q, b)).toBeLessThanOrEqual(0.6 + 1e-9);
  });
});
