import type { Page } from 'playwright-core';
import type { CaseAssumptions } from '../../src/case';
import { ovl } from './overlay-world';

type Ends = Record<'x1' | 'y1' | 'x2' | 'y2', number>;

/*
 * Marking as a user does it, with the mouse over the overlay: tool 1 across the object's ends, then
 * tool 2 across the landmark's. Ends are in CSS pixels from the video's top-left corner (the demo
 * and test pages show their clips at intrinsic size). Shared, with the assumptions below, by the
 * headless demo and the walkthrough pictures.
 */
export async function markObjectAndLandmark(page: Page, object: Ends, landmark: Ends): Promise<void> {
  const box = (await page.locator('video').boundingBox())!;
  const drag = async (p: Ends) => {
    await page.mouse.move(box.x + p.x1, box.y + p.y1);
    await page.mouse.down();
    await page.mouse.move(box.x + p.x2, box.y + p.y2, { steps: 6 });
    await page.mouse.up();
  };
  await ovl(page).focus('.surface');
  await page.keyboard.press('1');
  await drag(object);
  await page.keyboard.press('2');
  await drag(landmark);
}

/**
 * What a reviewer would type in the popup for the demo's invented clip: its camera's field of view,
 * the invented aircraft's known wingspan (a real clip would use its class band), the mast's size
 * within 10 % and the observer's speed.
 */
export function demoAssumptions(mastSizeM: number): CaseAssumptions {
  return {
    cameraLabel: 'camera known to 39-41 deg',
    hfovDeg: { lo: 39, hi: 41 },
    sizeLabel: 'wingspan known for the demo aircraft, 31-33 m',
    objectSizeM: { lo: 31, hi: 33 },
    aspectDeg: { lo: 90, hi: 90 },
    landmarkSizeM: { lo: mastSizeM * 0.9, hi: mastSizeM * 1.1 },
    observerSpeedMs: { lo: 86 / 3.6, hi: 94 / 3.6 },
    objectKind: 'fixed-wing-transport',
  };
}
