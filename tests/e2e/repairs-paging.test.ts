import { describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// Paging through the repair list by cursor: First / Previous / Next, the previous rows kept on screen while
// the next page loads, the total in words, a position that survives a reload, and the page on a 390 px phone.

const env = browserJourney({ demo: true });
const SLOW = { timeout: 120_000 };
const page = () => env.browser.page;
const firstLink = () => page().locator("table tbody tr").first().locator('a[href^="/repairs/"]').getAttribute("href");

describe("the repair list, paged by cursor, in Chromium", () => {
  it("steps forward, back and to the first page, and keeps the position in the URL", async () => {
    await signInThroughProvider(page(), env.stack.url, "analyst", DEMO_PASSWORD);
    await page().goto(`${env.stack.url}/repairs`);
    await page().getByText(/^[\d,]+ repair lines$/).waitFor(SLOW);
    const first = await firstLink();
    await page().getByRole("button", { name: "Next" }).click();
    await page().getByText(/^Page 2 of [\d,]+$/).waitFor();
    await page().getByRole("button", { name: "Next" }).click();
    await page().getByText(/^Page 3 of [\d,]+$/).waitFor();
    expect(page().url()).toMatch(/cursor=/);
    const third = await firstLink();
    await page().reload();
    await page().getByText(/^Page 3 of [\d,]+$/).waitFor(SLOW);
    expect(await firstLink()).toBe(third);
    await page().getByRole("button", { name: "Previous" }).click();
    await page().getByText(/^Page 2 of [\d,]+$/).waitFor();
    await page().getByRole("button", { name: "First" }).click();
    await page().getByText(/^Page 1 of [\d,]+$/).waitFor();
    expect(await firstLink()).toBe(first);
    await expect(page().getByRole("button", { name: "Previous" }).isDisabled()).resolves.toBe(true);
  }, 180_000);

  it("starts again at the top when the sort changes", async () => {
    await page().getByRole("button", { name: "Next" }).click();
    await page().getByText(/^Page 2 of/).waitFor();
    await page().getByRole("button", { name: /Hour meter/ }).click();
    await page().waitForURL((u) => u.searchParams.get("sort") === "hours" && !u.searchParams.has("cursor"));
    await page().getByText(/^Page 1 of/).waitFor();
  }, 60_000);

  it("fits a 390 px phone: the table scrolls inside its box, the pager wraps and stays usable", async () => {
    await page().setViewportSize({ width: 390, height: 844 });
    await page().getByRole("button", { name: "Next" }).click();
    await page().getByText(/^Page 2 of/).waitFor();
    const overflow = await page().evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    for (const name of ["First", "Previous", "Next"]) expect(await page().getByRole("button", { name }).isVisible()).toBe(true);
    await env.browser.screenshot("repairs-paging-390px");
    await page().setViewportSize({ width: 1280, height: 860 });
  }, 60_000);

  it("logs no console errors or failed requests", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
