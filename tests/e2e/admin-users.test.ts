import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Locator, Page } from "playwright-core";
import { openBrowser, signInThroughProvider, type Browser } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { seedShops } from "../helpers/test-app.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { apiPaths } from "../../shared/api-paths.js";

// An administrator gives a shop manager a second shop in Chromium, while the manager is signed in in another
// browser. An empty choice of shops is refused in words beside the field, nothing sent; the saved change is
// listed with its sentence; the manager's next page shows both shops without signing in again (the rule in
// README.md, "Who decides a user's access"). Pages are photographed at desktop and phone width.

const env = browserJourney();
let manager: Browser;
const admin = () => env.browser.page;
/** the access writes the admin's page sent */
const writes: string[] = [];

beforeAll(async () => {
  await seedShops(env.stack.tdb.db, [
    { code: "S1", name: "North yard" },
    { code: "S5", name: "Harbour yard" },
  ]);
  manager = await openBrowser();
  admin().on("request", (r) => {
    if (r.method() !== "GET" && r.url().includes("/api/admin/users")) writes.push(`${r.method()} ${new URL(r.url()).pathname}`);
  });
}, 120_000);
afterAll(async () => manager?.close());

const shopsInMenu = async (p: Page) => {
  await p.getByRole("button", { name: /Jarek Fenn/ }).click();
  const text = (await p.getByRole("menu").getByText(/^(Shops:|All shops)/).textContent())?.trim();
  await p.getByRole("button", { name: /Jarek Fenn/ }).click();
  return text;
};

async function problemOf(field: Locator): Promise<string | null> {
  const ids = ((await field.getAttribute("aria-describedby")) ?? "").split(/\s+/).filter(Boolean);
  for (const id of ids) {
    const el = admin().locator(`[id="${id}"][role="alert"]`);
    if (await el.count()) return (await el.textContent())?.trim() ?? null;
  }
  return null;
}

describe("an administrator giving a shop manager a second shop, in Chromium", () => {
  it("the manager, signed in, sees one shop", async () => {
    await signInThroughProvider(manager.page, env.stack.url, "manager.s1", DEMO_PASSWORD);
    await manager.page.waitForLoadState("networkidle");
    expect(await shopsInMenu(manager.page)).toBe("Shops: S1");
  }, 120_000);

  it("the administrator opens the manager's access from the Users page, where the rule is written", async () => {
    await signInThroughProvider(admin(), env.stack.url, "admin", DEMO_PASSWORD);
    await admin().waitForLoadState("networkidle");
    await admin().getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Users", exact: true }).click();
    await admin().getByRole("heading", { level: 1, name: "Users" }).waitFor();
    await admin().getByText(/Once an administrator has saved a user's roles and shops here, those replace the identity provider's/).waitFor();
    await admin().getByRole("button", { name: "Edit access of Jarek Fenn" }).click();
    const form = admin().getByRole("form", { name: "Access of Jarek Fenn" });
    await form.waitFor();
    expect(await form.getByRole("checkbox", { name: "S1 · North yard" }).isChecked()).toBe(true);
    expect(await form.getByRole("checkbox", { name: "S5 · Harbour yard" }).isChecked()).toBe(false);
    await photograph(env.browser, "admin-users-edit", form.getByRole("button", { name: "Save access" }));
  }, 120_000);

  it("refuses a manager with no shop in words beside the shops, sending nothing", async () => {
    const form = admin().getByRole("form", { name: "Access of Jarek Fenn" });
    await form.getByRole("checkbox", { name: "S1 · North yard" }).uncheck();
    await form.getByRole("button", { name: "Save access" }).click();
    await form.getByText("a shop manager needs at least one shop").waitFor();
    expect(await problemOf(form.getByRole("group", { name: "Shops" }))).toBe("a shop manager needs at least one shop");
    expect(writes).toEqual([]);
    await photograph(env.browser, "admin-users-refused", form.getByText("a shop manager needs at least one shop"));
  }, 60_000);

  it("saves S1 and S5, lists them and says so in a sentence", async () => {
    const form = admin().getByRole("form", { name: "Access of Jarek Fenn" });
    await form.getByRole("checkbox", { name: "S1 · North yard" }).check();
    await form.getByRole("checkbox", { name: "S5 · Harbour yard" }).check();
    await form.getByRole("button", { name: "Save access" }).click();
    await admin().getByRole("status").getByText("Jarek Fenn's access is saved: Shop manager; shops S1, S5.").waitFor();
    expect(writes).toEqual([`PUT ${apiPaths.adminUserAccess("manager.s1")}`]);
    const row = admin().getByRole("table", { name: "Users" }).locator("tbody tr").filter({ hasText: "Jarek Fenn" });
    await row.getByRole("cell", { name: "S1, S5", exact: true }).waitFor();
    await row.getByRole("cell", { name: "Ironledger", exact: true }).waitFor();
    await row.getByRole("button", { name: "Edit access of Jarek Fenn" }).click();
    await admin()
      .getByRole("list", { name: "Changes to this user's access" })
      .getByText("Odile Varrow changed Jarek Fenn's shops from S1 to S1 and S5 in Ironledger; from now on these replace the identity provider's roles and shops for them.")
      .waitFor();
    await photograph(env.browser, "admin-users-saved", admin().getByRole("list", { name: "Changes to this user's access" }));
  }, 60_000);

  it("the manager's next page shows both shops, without signing in again", async () => {
    await manager.page.goto(`${env.stack.url}/`, { waitUntil: "networkidle" });
    expect(manager.page.url()).toBe(`${env.stack.url}/`);
    expect(await shopsInMenu(manager.page)).toBe("Shops: S1, S5");
    const shops = await manager.page.evaluate(async (path) => (await (await fetch(path)).json()) as { shops: { code: string }[] }, apiPaths.shops());
    expect(shops.shops.map((s) => s.code)).toEqual(["S1", "S5"]);
    await manager.page.getByRole("button", { name: /Jarek Fenn/ }).click();
    await photograph(manager, "admin-users-manager-next-page", manager.page.getByRole("menu").getByText("Shops: S1, S5"));
  }, 60_000);

  it("logs no console errors", () => {
    expect(env.browser.consoleErrors).toEqual([]);
    expect(manager.consoleErrors).toEqual([]);
  });
});
