import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import type { Locator } from "playwright-core";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { shops as demoShops } from "../../etl/demo/scenario.js";

// A shop manager in Chromium: the other shops on the benchmarks page and in every CSV it offers are groups of
// three or more with the rule in words, never one shop; pages outside the manager's menu, opened by URL, say so
// and link the pages the manager can use.

const env = browserJourney({ demo: true });
const work = mkdtempSync(path.join(tmpdir(), "peer-csv-"));
const others = demoShops.filter((s) => s.code !== "S5");

/** Other shops' codes, towns or letters found in a text. */
const leaks = (text: string) => [
  ...others.filter((s) => new RegExp(`\\b${s.code}\\b`).test(text)).map((s) => s.code),
  ...others.filter((s) => text.includes(s.town)).map((s) => s.town),
  ...(text.match(/Peer [A-Z]\b/g) ?? []),
];

async function csvOf(button: Locator): Promise<string> {
  const page = env.browser.page;
  const [download] = await Promise.all([page.waitForEvent("download"), button.click()]);
  const file = path.join(work, download.suggestedFilename());
  await download.saveAs(file);
  return readFileSync(file, "utf8");
}

describe("a shop manager and the other shops, in Chromium", () => {
  it("shows manager.s5 the other shops only as groups of three or more, on the page and in every CSV", async () => {
    const page = env.browser.page;
    await signInThroughProvider(page, env.stack.url, "manager.s5", DEMO_PASSWORD, "/benchmarks");
    const summary = page.getByRole("region", { name: "Where your shop stands" });
    await summary.getByText(/S5 Maplewick/).first().waitFor();
    await summary.getByText("How other shops are shown").waitFor();
    await summary.getByText(/at least 3 shops/).first().waitFor();
    const table = page.getByRole("region", { name: "Shop KPIs" });
    const row = table.getByRole("row", { name: /Other shops \(7\)/ });
    await row.waitFor();
    expect(await row.textContent()).toMatch(/in groups of 3 or more/);
    await page.getByRole("region", { name: "Funnel: comeback rate against volume" }).getByRole("img").waitFor();
    await page.getByRole("region", { name: "Trend by month" }).getByRole("img").waitFor();

    const text = (await page.locator("main").textContent()) ?? "";
    expect(leaks(text)).toEqual([]);

    const kpis = await csvOf(table.getByRole("button", { name: "CSV" }));
    expect(kpis).toContain("Other shops (7)");
    const funnel = await csvOf(page.getByRole("region", { name: "Funnel: comeback rate against volume" }).getByRole("button", { name: "CSV" }));
    const trend = await csvOf(page.getByRole("region", { name: "Trend by month" }).getByRole("button", { name: "CSV" }));
    const fixFunnelCsv = await csvOf(page.getByRole("region", { name: "Funnel: first-time fix against complaints" }).getByRole("button", { name: "CSV" }));
    const fixTable = page.getByRole("region", { name: "First-time fix and cycle time" });
    const fixCsv = await csvOf(fixTable.getByRole("button", { name: "CSV" }));
    // seven other shops: the group figure is shown, and the CSV's rows are the group, S5 and S5's technicians
    expect(fixCsv.split("\n")[1]).toMatch(/^Group,group,/);
    expect(leaks(fixFunnelCsv)).toEqual([]);
    expect(leaks(fixCsv)).toEqual([]);
    for (const [name, csv] of [["kpis", kpis], ["funnel", funnel], ["trend", trend], ["fix funnel", fixFunnelCsv]] as const) {
      expect(leaks(csv), name).toEqual([]);
      // every shop row of the figures is S5's own or the other shops as a group
      const shopsNamed = csv.split("\n").slice(1).filter(Boolean).map((l) => l.split(",")[0]!.replace(/^"|"$/g, ""));
      expect(shopsNamed.every((s) => s === "S5 Maplewick" || s.startsWith("Other shops (7)")), name).toBe(true);
    }
    await photograph(env.browser, "peers-manager-benchmarks", summary.getByText("How other shops are shown"));
  });

  for (const [url, subject, shot] of [
    ["/life", "the failure analytics", "peers-manager-life-refused"],
    ["/admin/users", "the administration pages", "peers-manager-admin-users-refused"],
  ] as const) {
    it(`refuses ${url} to manager.s5 opened by URL, with the pages they can use instead`, async () => {
      const page = env.browser.page;
      await page.goto(env.stack.url + url, { waitUntil: "networkidle" });
      const alert = page.getByRole("alert");
      await alert.getByRole("heading", { name: "Not one of your pages" }).waitFor();
      await alert.getByText(`You do not have access to ${subject}.`).waitFor();
      const yours = alert.getByRole("navigation", { name: "Your pages" });
      const offered = await yours.getByRole("link").allTextContents();
      // the pages offered are the manager's own menu: the shop pages, never the analyst's or the admin's
      expect(offered).toEqual(expect.arrayContaining(["Overview", "Clusters", "Rates", "Repairs", "Benchmarks", "Claims", "Imports"]));
      expect(offered.filter((l) => /^(Life|Users|Shops|Settings|Admin)/.test(l))).toEqual([]);
      expect(await page.getByRole("button", { name: /retry|reload/i }).count()).toBe(0);
      const main = page.getByRole("navigation", { name: "Main" });
      await main.waitFor();
      for (const l of offered) expect(await main.getByRole("link", { name: l, exact: true }).count(), l).toBe(1);
      await photograph(env.browser, shot, yours);
      await yours.getByRole("link", { name: "Benchmarks" }).click();
      await page.getByRole("heading", { name: "Shop benchmarks", level: 1 }).waitFor();
    });
  }

  it("asked the API nothing it had to refuse", () => {
    expect(env.browser.consoleErrors).toEqual([]);
  });
});
