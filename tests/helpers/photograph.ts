import { expect } from "vitest";
import type { Locator, Page } from "playwright-core";
import type { Browser } from "./browser.js";

export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1280, height: 860 };

/** How far the page scrolls sideways (0 when anything wide scrolls inside its own box). */
export const sidewaysOverflow = (p: Page) => p.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

/** Desktop and 390 px screenshots; at neither width may the page scroll sideways, and on the phone `inSight` must be on screen. */
export async function photograph(browser: Browser, name: string, inSight?: Locator): Promise<void> {
  const page = browser.page;
  expect(await sidewaysOverflow(page)).toBeLessThanOrEqual(0);
  await browser.screenshot(`${name}-desktop`);
  await page.setViewportSize(PHONE);
  expect(await sidewaysOverflow(page)).toBeLessThanOrEqual(0);
  if (inSight) {
    const box = (await inSight.boundingBox())!;
    expect(box.x).toBeGreaterThanOrEqual(0);
    expect(box.x + box.width).toBeLessThanOrEqual(PHONE.width);
  }
  await browser.screenshot(`${name}-390px`);
  await page.setViewportSize(DESKTOP);
}
