import { describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// The route areas' error boundaries in Chromium: a claim that does not exist and a page the role may not
// open are explained in words inside the layout, without a retry that could not help.

const env = browserJourney();
const PHONE = { width: 390, height: 844 };
const DESKTOP = { width: 1280, height: 860 };

describe("route area error boundaries in Chromium", () => {
  it("tells the clerk a missing claim was not found, at desktop and phone width", async () => {
    const { page } = env.browser;
    await signInThroughProvider(page, env.stack.url, "clerk", DEMO_PASSWORD);
    await page.goto(`${env.stack.url}/claims/999999`, { waitUntil: "networkidle" });
    const alert = page.getByRole("alert");
    await alert.getByRole("heading", { name: "Not found" }).waitFor();
    await alert.getByText("Claim 999999 was not found.").waitFor();
    expect(await page.getByRole("button", { name: /retry|reload/i }).count()).toBe(0);
    await page.getByRole("navigation", { name: "Main" }).waitFor();
    await env.browser.screenshot("route-error-claim-not-found");
    await page.setViewportSize(PHONE);
    await env.browser.screenshot("route-error-claim-not-found-phone");
    await page.setViewportSize(DESKTOP);
    await alert.getByRole("link", { name: "All claims" }).click();
    await page.getByRole("heading", { name: "Warranty claims", level: 1 }).waitFor();
    await page.getByText("No claims yet").waitFor();
    await page.setViewportSize(PHONE);
    await env.browser.screenshot("route-error-back-to-claims-phone");
    await page.setViewportSize(DESKTOP);
  });

  it("tells the clerk they do not have access to the administration pages", async () => {
    const { page } = env.browser;
    await page.goto(`${env.stack.url}/admin/users`, { waitUntil: "networkidle" });
    await page.getByRole("alert").getByText("You do not have access to the administration pages.").waitFor();
    expect(await page.getByRole("button", { name: /retry|reload/i }).count()).toBe(0);
    await env.browser.screenshot("route-error-no-access");
    await page.setViewportSize(PHONE);
    await env.browser.screenshot("route-error-no-access-phone");
    await page.setViewportSize(DESKTOP);
  });

  it("logged only the refusals it asked for", () => {
    // the two refused requests, and the browser's own line for each
    const unexpected = env.browser.consoleErrors.filter(
      (e) => !/^HTTP 40[34] .*\/api\/(claims\/999999|admin\/users)$/.test(e) && !/status of 40[34]/.test(e),
    );
    expect(unexpected).toEqual([]);
  });
});
