import type { Page } from 'playwright-core';

type Ends = Record<'x1' | 'y1' | 'x2' | 'y2', number>;

/*
 * Marking as a user does it, with the mouse over the overlay: tool 1 across the object's ends, then
 * tool 2 across the landmark's. Ends are in CSS pixels from the video's top-left corner (the demo
 * and test pages show their clips at intrinsic size). Shared by the headless demo and the
 * walkthrough pictures.
 */
export async function markObjectAndLandmark(page: Page, object: Ends, landmark: Ends): Promise<void> {
  const box = (await page.locator('video').boundingBox())!;
  const drag = async (p: Ends) => {
    await page.mouse.move(box.x + p.x1, box.y + p.y1);
    await page.mouse.down();
    await page.mouse.move(box.x + p.x2, box.y + p.y2, { steps: 6 });
    await page.mouse.up();
  };
  await page.locator('clip-caliper-overlay .surface').focus();
  await page.keyboard.press('1');
  await drag(object);
  await page.keyboard.press('2');
  await drag(landmark);
}
