import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Locator } from "playwright-core";
import { parse as parseCsv } from "csv-parse/sync";
import { artifactsDir, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DESKTOP, PHONE, photograph } from "../helpers/photograph.js";
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
    await panel.getByText(/standard ÷ .* actual over [\d,]+ lines/).waitFor();
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

  it("puts first-time fix on a funnel with its labels apart, and the cycle medians with their intervals in the table and its CSV", async () => {
    const page = env.browser.page;
    const funnel = page.getByRole("region", { name: "Funnel: first-time fix against complaints" });
    await funnel.getByRole("img").waitFor();
    await funnel.scrollIntoViewIfNeeded();
    // no two shop labels overlap on screen (boxes as the browser lays them out)
    const labelBoxes = (where: Locator, pattern: RegExp) =>
      where.locator("svg text").evaluateAll(
        (els, source) => els.filter((e) => new RegExp(source).test(e.textContent ?? "")).map((e) => ({ t: e.textContent, ...e.getBoundingClientRect().toJSON() as DOMRect })),
        pattern.source,
      );
    const apart = (bs: { x: number; y: number; width: number; height: number }[]) =>
      bs.flatMap((a, i) => bs.slice(i + 1).filter((b) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height)).length;
    const shops = await labelBoxes(funnel, /^S\d$/);
    expect(shops.length).toBeGreaterThanOrEqual(6);
    expect(apart(shops)).toBe(0);
    await funnel.screenshot({ path: `${artifactsDir}/director-fix-funnel-chart-desktop.png` });
    await photograph(env.browser, "director-fix-funnel", funnel.getByRole("heading"));

    const fix = page.getByRole("region", { name: "First-time fix and cycle time" });
    // the median with its distribution-free interval beside it
    await fix.getByText(/\d\sd \(95\s%: [\d.]+–[\d.]+\sd\)/).first().waitFor();
    const [download] = await Promise.all([page.waitForEvent("download"), fix.getByRole("button", { name: "CSV" }).click()]);
    const rows = parseCsv(readFileSync((await download.path())!, "utf8"), { columns: true }) as Record<string, string>[];
    const group = rows.find((r) => r.Level === "group")!;
    const [lo, med, hi] = ["Cycle median 95 % lower (days)", "Cycle median (days)", "Cycle median 95 % upper (days)"].map((k) => Number(group[k]));
    expect(lo).toBeLessThanOrEqual(med!);
    expect(hi).toBeGreaterThanOrEqual(med!);
    expect(Number(group["Cycle median interval coverage (fraction)"])).toBeGreaterThanOrEqual(0.95);
    expect(rows.filter((r) => r.Level === "shop")).toHaveLength(8);

    // one shop's technicians on the same funnel
    await fix.getByRole("button", { name: "Show the technicians of S5" }).click();
    const techs = page.getByRole("region", { name: /^Funnel: first-time fix of the technicians of S5/ });
    await techs.getByRole("img").waitFor();
    const techBoxes = await labelBoxes(techs, /^S5-T\d+$/);
    expect(techBoxes.length).toBeGreaterThan(1);
    expect(apart(techBoxes)).toBe(0);
    await techs.scrollIntoViewIfNeeded();
    await techs.screenshot({ path: `${artifactsDir}/director-fix-funnel-technicians-chart-desktop.png` });
    await page.setViewportSize(PHONE);
    // the chart is drawn again at the phone's width
    await techs.scrollIntoViewIfNeeded();
    await expect.poll(async () => {
      const boxes = await labelBoxes(techs, /^S5-T\d+$/);
      return boxes.length > 1 && apart(boxes) === 0;
    }).toBe(true);
    await techs.screenshot({ path: `${artifactsDir}/director-fix-funnel-technicians-chart-390px.png` });
    await page.setViewportSize(DESKTOP);
    await photograph(env.browser, "director-fix-funnel-technicians", techs.getByRole("heading"));
  });

  it("logs no console errors", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
