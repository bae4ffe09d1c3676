import { beforeAll, describe, expect, it } from "vitest";
import type { Locator } from "playwright-core";
import { forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { apiPaths } from "../../shared/api-paths.js";

// An administrator keeps the shop register in Chromium: a new shop with a latitude out of range and a time zone
// that is no IANA name is refused in the browser, each problem in words under its field and nothing sent; once
// corrected it is saved and listed; its name is edited and the list shows the new one. A shop manager who opens
// the register by its address is told in words that the administration pages are not theirs. Pages are
// photographed at desktop and phone width. (The shop is a test shop: code T9, invented for this test.)

const env = browserJourney({ demo: true });
const CODE = "T9";
const NAME = "Test shop nine";
const RENAMED = "Test shop nine, north yard";

const page = () => env.browser.page;
/** requests that never got an answer (refused connection, aborted): none may happen */
const failedRequests: string[] = [];
/** the register's writes the page sent (POST and PUT), in order */
const writes: string[] = [];

beforeAll(() => {
  page().on("requestfailed", (r) => failedRequests.push(`${r.method()} ${r.url()} ${r.failure()?.errorText ?? ""}`));
  page().on("request", (r) => {
    if (r.method() !== "GET" && r.url().includes(apiPaths.adminShops())) writes.push(`${r.method()} ${new URL(r.url()).pathname}`);
  });
});



/** The words shown beside a field: the text of the elements its aria-describedby names that are alerts. */
async function problemOf(field: Locator): Promise<string | null> {
  const ids = ((await field.getAttribute("aria-describedby")) ?? "").split(/\s+/).filter(Boolean);
  for (const id of ids) {
    const el = page().locator(`[id="${id}"][role="alert"]`);
    if (await el.count()) return (await el.textContent())?.trim() ?? null;
  }
  return null;
}

const register = () => page().getByRole("table", { name: "Registered shops" });
const rowOf = (code: string) => register().locator("tbody tr").filter({ has: page().getByRole("cell", { name: code, exact: true }) });
const stored = async (code: string) =>
  (await env.stack.tdb.pool.query(`SELECT name, lat, lon, time_zone FROM dim_shop WHERE shop_code = $1`, [code])).rows;

describe("an administrator's shop register, in Chromium", () => {
  it("lists the registered shops", async () => {
    await signInThroughProvider(page(), env.stack.url, "admin", DEMO_PASSWORD);
    // the overview the sign-in lands on finishes first: leaving it earlier would abort its requests
    await page().waitForLoadState("networkidle");
    await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Shops", exact: true }).click();
    await page().getByRole("heading", { level: 1, name: "Shops" }).waitFor();
    const shops = (await env.stack.tdb.pool.query<{ code: string }>(`SELECT shop_code AS code FROM dim_shop ORDER BY shop_code`)).rows;
    expect(shops.length).toBeGreaterThan(0);
    await rowOf(shops[0].code).waitFor();
    expect(await register().locator("tbody tr").count()).toBe(shops.length);
    expect(await rowOf(CODE).count()).toBe(0);
    await photograph(env.browser, "admin-shops", page().getByRole("button", { name: "Add a shop" }));
  }, 180_000);

  it("refuses a latitude out of range and an unknown time zone in words beside each field, sending nothing", async () => {
    await page().getByRole("button", { name: "Add a shop" }).click();
    const form = page().getByRole("form", { name: "Add a shop" });
    await form.waitFor();
    await form.getByLabel("Code").fill(CODE);
    await form.getByLabel("Name").fill(NAME);
    await form.getByLabel("Latitude").fill("95");
    await form.getByLabel("Longitude").fill("10.75");
    await form.getByLabel("Time zone").fill("Europe/Atlantis");
    await form.getByRole("button", { name: "Add shop" }).click();

    const lat = form.getByLabel("Latitude");
    const tz = form.getByLabel("Time zone");
    await form.getByText("latitude must lie between -90 and 90").waitFor();
    expect(await problemOf(lat)).toBe("latitude must lie between -90 and 90");
    expect(await problemOf(tz)).toBe("time zone is not an IANA name such as Europe/Oslo");
    expect(await lat.getAttribute("aria-invalid")).toBe("true");
    expect(await tz.getAttribute("aria-invalid")).toBe("true");
    // the fields without a problem say nothing
    expect(await problemOf(form.getByLabel("Name"))).toBeNull();
    expect(await problemOf(form.getByLabel("Longitude"))).toBeNull();
    expect(writes).toEqual([]);
    expect(await stored(CODE)).toEqual([]);
    await photograph(env.browser, "admin-shops-refused", form.getByText("latitude must lie between -90 and 90"));
  }, 60_000);

  it("saves the corrected shop and lists it", async () => {
    const form = page().getByRole("form", { name: "Add a shop" });
    await form.getByLabel("Latitude").fill("59.91");
    await form.getByLabel("Time zone").fill("Europe/Oslo");
    await form.getByRole("button", { name: "Add shop" }).click();
    await page().getByRole("status").getByText(`Shop ${CODE} (${NAME}) is saved.`).waitFor();
    expect(await form.count()).toBe(0);
    // the form is gone: the keyboard goes on from the words that say the shop is saved
    expect(await page().evaluate(() => document.activeElement?.textContent)).toBe(`Shop ${CODE} (${NAME}) is saved.`);
    const row = rowOf(CODE);
    await row.getByRole("cell", { name: NAME, exact: true }).waitFor();
    await row.getByRole("cell", { name: "59.91, 10.75", exact: true }).waitFor();
    await row.getByRole("cell", { name: "Europe/Oslo", exact: true }).waitFor();
    expect(writes).toEqual([`POST ${apiPaths.adminShops()}`]);
    expect(await stored(CODE)).toEqual([{ name: NAME, lat: 59.91, lon: 10.75, time_zone: "Europe/Oslo" }]);
    await photograph(env.browser, "admin-shops-added", row.getByRole("button", { name: `Edit shop ${CODE}` }));
  }, 60_000);

  it("edits the shop's name, its code shown and unchangeable, and lists the new name", async () => {
    await rowOf(CODE).getByRole("button", { name: `Edit shop ${CODE}` }).click();
    const form = page().getByRole("form", { name: `Edit shop ${CODE}` });
    await form.waitFor();
    const code = form.getByLabel("Code");
    expect(await code.inputValue()).toBe(CODE);
    expect(await code.getAttribute("readonly")).not.toBeNull();
    // and it looks it: not on the white of the fields that can be changed
    const background = (l: Locator) => l.evaluate((e) => getComputedStyle(e).backgroundColor);
    expect(await background(code)).not.toBe(await background(form.getByLabel("Name")));
    // the form opens with the shop as stored
    expect(await form.getByLabel("Name").inputValue()).toBe(NAME);
    expect(await form.getByLabel("Latitude").inputValue()).toBe("59.91");
    expect(await form.getByLabel("Time zone").inputValue()).toBe("Europe/Oslo");
    await form.getByLabel("Name").fill(RENAMED);
    await photograph(env.browser, "admin-shops-edit", form.getByRole("button", { name: "Save changes" }));
    await form.getByRole("button", { name: "Save changes" }).click();
    await page().getByRole("status").getByText(`Shop ${CODE} (${RENAMED}) is saved.`).waitFor();
    await rowOf(CODE).getByRole("cell", { name: RENAMED, exact: true }).waitFor();
    expect(await register().getByRole("cell", { name: NAME, exact: true }).count()).toBe(0);
    expect(writes).toEqual([`POST ${apiPaths.adminShops()}`, `PUT ${apiPaths.adminShop(CODE)}`]);
    expect(await stored(CODE)).toEqual([{ name: RENAMED, lat: 59.91, lon: 10.75, time_zone: "Europe/Oslo" }]);
    await photograph(env.browser, "admin-shops-renamed", rowOf(CODE).getByRole("button", { name: `Edit shop ${CODE}` }));
  }, 60_000);

  it("logs no console errors or failed requests", () => {
    expect(env.browser.consoleErrors).toEqual([]);
    expect(failedRequests).toEqual([]);
  });
});

describe("a shop manager opening the register by its address, in Chromium", () => {
  it("is told in words that the administration pages are not theirs, and sees no register", async () => {
    await forgetSessions(page());
    await signInThroughProvider(page(), env.stack.url, "manager.s1", DEMO_PASSWORD);
    await page().waitForLoadState("networkidle");
    expect(await page().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Shops", exact: true }).count()).toBe(0);
    await page().goto(`${env.stack.url}/admin/shops`, { waitUntil: "networkidle" });
    const refusal = page().getByRole("alert");
    await refusal.getByRole("heading", { name: "Not one of your pages" }).waitFor();
    await refusal.getByText("You do not have access to the administration pages.").waitFor();
    expect(await page().getByRole("heading", { level: 1, name: "Shops" }).count()).toBe(0);
    expect(await page().getByRole("table", { name: "Registered shops" }).count()).toBe(0);
    expect(await page().getByRole("button", { name: "Add a shop" }).count()).toBe(0);
    expect(await page().getByRole("button", { name: /retry|reload/i }).count()).toBe(0);
    await page().getByRole("navigation", { name: "Main" }).waitFor();
    await photograph(env.browser, "admin-shops-manager-refused", refusal);
  }, 120_000);

  it("asked the server for nothing it would refuse: the page knew the role before fetching, and no request failed", () => {
    expect(env.browser.consoleErrors).toEqual([]);
    expect(failedRequests).toEqual([]);
  });
});
