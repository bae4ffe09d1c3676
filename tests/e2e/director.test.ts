import { describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// The director's benchmark page does the whole job: a comeback window typed freely (and explained when it is
// out of range), the labour lines behind a shop's efficiency, and the back-order winter of the demo world
// (../shared/SCENARIO.md, planted signal (c): K26 heater-plug parts ordered November 2022 to February 2023).

const env = browserJourney({ demo: true });

describe("the director's benchmarks in Chromium", () => {
  it("applies a typed 60-day window and explains an out-of-range one beside the field", async () => {
    const page = env.browser.page;
    await signInThroughProvider(page, env.stack.url, "director", DEMO_PASSWORD, "/benchmarks");
    await page.getByRole("region", { name: "Which shop needs a visit" }).getByRole("heading").waitFor();
    const days = page.getByLabel("Comeback within (days)");
    await days.fill("");
    await page.getByText("Enter a number of days from 7 to 90.").waitFor();
    await days.fill("95");
    await page.getByText(/95 is above the longest window, 90 days\. Still using 30\./).waitFor();
    expect(page.url()).not.toContain("days=");
    await days.fill("30");
    await days.selectText();
    await days.pressSequentially("60");
    expect(await days.inputValue()).toBe("60");
    await expect.poll(() => new URL(page.url()).searchParams.get("days")).toBe("60");
    const kpis = page.getByRole("region", { name: "Shop KPIs" });
    await expect.poll(async () => (await kpis.textContent()) ?? "").toMatch(/within 60 days and 100 engine hours/);
    expect(await page.getByRole("alert").filter({ hasText: /window|Enter/ }).count()).toBe(0);
    await photograph(env.browser, "director-window", days);
  });

  it("opens the labour lines behind a shop's efficiency, worst first, with their CSV", async () => {
    const page = env.browser.page;
    const kpis = page.getByRole("region", { name: "Shop KPIs" });
    await kpis.getByRole("button", { name: "Labour efficiency of S3 Ottermere: see the lines" }).click();
    const panel = page.getByRole("region", { name: "Lines behind the figure" });
    await panel.getByRole("heading", { name: /Labour efficiency — S3 Ottermere/ }).waitFor();
    await panel.getByText(/standard ÷ .* actual over \d+ lines/).waitFor();
    expect(await panel.getByRole("row").count()).toBeGreaterThan(10);
    const csv = panel.getByRole("link", { name: "CSV" });
    expect(await csv.getAttribute("href")).toMatch(/lines\.csv\?.*kpi=efficiency.*shop=S3|lines\.csv\?.*shop=S3.*kpi=efficiency/);
    await photograph(env.browser, "director-labour-lines", panel.getByRole("heading"));
    await panel.getByRole("button", { name: "Parts wait" }).click();
    await panel.getByRole("heading", { name: /Parts wait — S3 Ottermere/ }).waitFor();
    await panel.getByText(/median .* 90th percentile/).waitFor();
  });

  it("finds the back-order winter in the parts waits and the first-time fix below the funnel at S5", async () => {
    const page = env.browser.page;
    const months = page.getByRole("region", { name: "Parts waits by month of order" });
    await months.getByRole("img", { name: /^Parts waits by month of order/ }).first().waitFor();
    const winter = months.getByRole("listitem").first();
    await expect.poll(async () => (await winter.textContent()) ?? "").toMatch(/^November 2022 to February 2023.*Heater-plug set for K26-4R/);
    await page.getByRole("region", { name: "Parts waits by shop" }).getByText(/waited over 7 days/).first().waitFor();
    const fix = page.getByRole("region", { name: "First-time fix and cycle time" });
    await fix.getByText(/S5 Maplewick: .* below the/).waitFor();
    await winter.scrollIntoViewIfNeeded();
    await photograph(env.browser, "director-waits", winter);
  });

  it("logs no console errors", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
