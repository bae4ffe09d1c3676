import { describe, expect, it } from "vitest";
import { signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { photograph } from "../helpers/photograph.js";
import { axeViolations } from "../helpers/axe.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

// A shop manager opens "Your account" from the user menu in the header, sees this week's digest as it reads
// now (their own shop only), turns the weekly digest off and on again and moves it to Wednesday; each change is
// stored at once and said in words. The page is checked with axe-core (WCAG 2.1 A and AA rules) and
// photographed at desktop and 390 px width.

const env = browserJourney({ demo: true });
const page = () => env.browser.page;
const OWN = "S1";

const stored = async () =>
  (await env.stack.tdb.pool.query<{ enabled: boolean; weekday: number }>(
    `SELECT p.enabled, p.weekday FROM digest_preference p JOIN app_user u ON u.sub = p.sub WHERE u.email = 'manager.s1@ironledger.invalid'`,
  )).rows;

describe("a shop manager's account page, in Chromium", () => {
  it("is reached from the user menu and shows this week's digest for their own shop only", async () => {
    await signInThroughProvider(page(), env.stack.url, "manager.s1", DEMO_PASSWORD);
    await page().waitForLoadState("networkidle");
    await page().getByRole("button", { name: "Jarek Fenn" }).click();
    await page().getByRole("menuitem", { name: "Your account and weekly digest" }).click();
    await page().getByRole("heading", { level: 1, name: "Your account" }).waitFor();
    const preview = page().getByRole("article", { name: "Digest preview" });
    await preview.getByRole("heading", { name: /^Your shop against the group/ }).waitFor({ timeout: 120_000 });
    await preview.getByRole("heading", { name: /^Claims and lines due in the next 14 days/ }).waitFor();
    const words = (await preview.textContent()) ?? "";
    expect(words).toMatch(new RegExp(`\\b${OWN}\\b`));
    const others = (await env.stack.tdb.pool.query<{ code: string; name: string }>(`SELECT shop_code AS code, name FROM dim_shop WHERE shop_code <> $1`, [OWN])).rows;
    expect(others.length).toBeGreaterThan(0);
    for (const o of others) {
      expect(words).not.toMatch(new RegExp(`\\b${o.code}\\b`));
      expect(words).not.toContain(o.name);
    }
    expect(await page().getByRole("switch", { name: "Weekly digest by e-mail" }).getAttribute("aria-checked")).toBe("true");
    await page().getByRole("status").getByText(/every Monday morning/).waitFor();
    expect(await axeViolations(page())).toEqual([]);
    await photograph(env.browser, "account", page().getByRole("switch", { name: "Weekly digest by e-mail" }));
  }, 240_000);

  it("turns the digest off and on again, each change stored and said in words", async () => {
    const toggle = page().getByRole("switch", { name: "Weekly digest by e-mail" });
    await toggle.click();
    await page().getByRole("status").getByText(/^Off: no weekly digest is sent to you/).waitFor();
    expect(await toggle.getAttribute("aria-checked")).toBe("false");
    await expect.poll(stored, { timeout: 30_000 }).toEqual([{ enabled: false, weekday: 1 }]);
    expect(await page().getByLabel("Comes on").isDisabled()).toBe(true);
    await toggle.click();
    await page().getByRole("status").getByText(/every Monday morning/).waitFor();
    await expect.poll(stored, { timeout: 30_000 }).toEqual([{ enabled: true, weekday: 1 }]);
  }, 60_000);

  it("moves the digest to the chosen weekday", async () => {
    await page().getByLabel("Comes on").selectOption({ label: "Wednesday" });
    await page().getByRole("status").getByText(/every Wednesday morning/).waitFor();
    await expect.poll(stored, { timeout: 30_000 }).toEqual([{ enabled: true, weekday: 3 }]);
    await page().reload();
    await page().getByRole("status").getByText(/every Wednesday morning/).waitFor();
    expect(await page().getByLabel("Comes on").inputValue()).toBe("3");
    await photograph(env.browser, "account-wednesday", page().getByLabel("Comes on"));
  }, 60_000);
});
