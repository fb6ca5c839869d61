import type { Gray } from './gray';

/*
 * How much of the pixel noise reaches a linear functional of a snapping profile (snap.ts): the
 * profile's samples are bilinear reads of the picture along parallel lines, so a functional of them
 * is a weighted sum of pixels, and its noise sigma is the pixel noise times the root of the sum of
 * squared weights (common practice for linear error propagation). The weights are gathered on a
 * scratch grid around the line, sized once for the longest profile snapping takes.
 */
let gridSide = 0;
let grid = new Float64Array(0);

/** Sizes the scratch grid: a side long enough for the longest profile and its parallel lines, in px. */
export function reserveNoiseGrid(side: number): void {
  if (side > gridSide) {
    gridSide = side;
    grid = new Float64Array(side * side);
  }
}

/**
 * Root of the sum of squared pixel weights of a linear functional of the profile (coefficients c on
 * its samples): multiplied by the pixel noise sigma it gives the functional's noise sigma.
 */
export function functionalNorm(img: Gray, x: number, y: number, dx: number, dy: number, s0: number, h: number, n: number, c: Float64Array, lines: number, lineSpacing: number): number {
  const lineMid = (lines - 1) / 2;
  const sEnd = s0 + (n - 1) * h;
  const tMax = lineMid * lineSpacing;
  const px = -dy;
  const py = dx;
  const gx0 = Math.floor(Math.min(x + s0 * dx, x + sEnd * dx) - tMax * Math.abs(px) - 0.5);
  const gy0 = Math.floor(Math.min(y + s0 * dy, y + sEnd * dy) - tMax * Math.abs(py) - 0.5);
  const side = gridSide;
  grid.fill(0);
  const wm = img.width - 1;
  const hm = img.height - 1;
  for (let q = 0; q < n * lines; q++) {
    const j = q % n;
    const cj = c[j]! / lines;
    if (cj === 0) continue;
    const s = s0 + j * h;
    const t = (Math.floor(q / n) - lineMid) * lineSpacing;
    const fx = x + s * dx + t * px - 0.5;
    const fy = y + s * dy + t * py - 0.5;
    const fi = Math.floor(fx);
    const fj = Math.floor(fy);
    const tx = fx - fi;
    const ty = fy - fj;
    // clamped pixels are the same pixel, so their weights must add before squaring
    const i0 = (fi < 0 ? 0 : fi > wm ? wm : fi) - gx0;
    const i1 = (fi + 1 < 0 ? 0 : fi + 1 > wm ? wm : fi + 1) - gx0;
    const j0 = (fj < 0 ? 0 : fj > hm ? hm : fj) - gy0;
    const j1 = (fj + 1 < 0 ? 0 : fj + 1 > hm ? hm : fj + 1) - gy0;
    addWeight(i0, j0, cj * (1 - tx) * (1 - ty), side);
    addWeight(i1, j0, cj * tx * (1 - ty), side);
    addWeight(i0, j1, cj * (1 - tx) * ty, side);
    addWeight(i1, j1, cj * tx * ty, side);
  }
  let ss = 0;
  for (let k = 0; k < side * side; k++) ss += grid[k]! * grid[k]!;
  return Math.sqrt(ss);
}

function addWeight(i: number, j: number, w: number, side: number): void {
  // clamping to the image can only move a pixel toward the grid's interior, never out of it
  if (i >= 0 && i < side && j >= 0 && j < side) grid[j * side + i]! += w;
}
