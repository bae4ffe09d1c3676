import { describe, expect, it } from "vitest";
import { forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { shops as demoShops } from "../../etl/demo/scenario.js";

// The planted comeback shop (S5, SCENARIO.md signal (b)) must be the one the page sends the director to.

const env = browserJourney({ demo: true });


describe("the benchmarks page in Chromium", () => {
  it("shows a director the shop to visit first, the funnel with S5 flagged in words, and the comeback pairs", async () => {
    const page = env.browser.page;
    await signInThroughProvider(page, env.stack.url, "director", DEMO_PASSWORD);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Benchmarks" }).click();
    const visits = page.getByRole("region", { name: "Which shop needs a visit" });
    await visits.getByRole("heading", { name: /Which shop needs a visit — 12 months to May 2025/ }).waitFor();
    const first = visits.getByRole("listitem").first();
    expect(await first.textContent()).toMatch(/^Visit\s*S5 Maplewick/);
    await expect.poll(() => visits.getByText(/Technician S5-T2/).count()).toBeGreaterThan(0);

    const funnel = page.getByRole("region", { name: "Funnel: comeback rate against volume" });
    await funnel.getByRole("img").waitFor();
    await funnel.getByText(/S5 Maplewick.*above the 99\.8 % limit/).waitFor();
    await env.browser.screenshot("benchmarks-director");

    await first.getByRole("button", { name: "See the comeback pairs" }).click();
    const pairs = page.getByRole("region", { name: "Comeback pairs" });
    await pairs.getByText(/qualifying lines came back/).waitFor();
    await pairs.getByRole("button", { name: /^S5-T2/ }).click();
    await pairs.getByRole("heading", { name: /technician S5-T2/ }).waitFor();
    await pairs.getByText(/qualifying lines came back/).waitFor();
    expect(await pairs.getByRole("row").count()).toBeGreaterThan(5);
    await env.browser.screenshot("benchmarks-director-pairs");
  });

  it("shows manager.s5 their shop by name and the other shops only as groups", async () => {
    const page = env.browser.page;
    await forgetSessions(page);
    await signInThroughProvider(page, env.stack.url, "manager.s5", DEMO_PASSWORD, "/benchmarks");
    const summary = page.getByRole("region", { name: "Where your shop stands" });
    await summary.getByText(/S5 Maplewick/).first().waitFor();
    const table = page.getByRole("region", { name: "Shop KPIs" });
    await table.getByRole("row", { name: /Other shops \(7\)/ }).waitFor();
    const text = (await page.locator("main").textContent()) ?? "";
    for (const s of demoShops.filter((x) => x.code !== "S5")) {
      expect(text, s.code).not.toMatch(new RegExp(`\\b${s.code}\\b`));
      expect(text, s.town).not.toContain(s.town);
    }
    expect(text).not.toMatch(/Peer [A-G]\b/);
    await env.browser.screenshot("benchmarks-manager");
  });

  it("logs no console errors", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
