import { describe, expect, it } from "vitest";
import { forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DESKTOP, PHONE, sidewaysOverflow } from "../helpers/photograph.js";
import { axeViolations } from "../helpers/axe.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";
import { navItems } from "../../src/app/navigation.js";
import { pagePaths } from "../../src/app/page-paths.js";
import type { Role } from "../../shared/roles.js";

// Every page of every role's menu, on the demo world, at desktop and at 390 px: no page scrolls sideways, and
// axe-core finds no WCAG 2 A or AA violation. Pages are those of src/app/navigation.ts, so a page added to a
// menu is checked without touching this file; the account page, reached from the header, is checked for every role.

const env = browserJourney({ demo: true });
const accounts: { username: string; role: Role }[] = [
  { username: "admin", role: "admin" },
  { username: "analyst", role: "analyst" },
  { username: "director", role: "director" },
  { username: "manager.s5", role: "manager" },
  { username: "clerk", role: "clerk" },
  { username: "tech.s1s2", role: "technician" },
];
/** pages every role reaches outside the main menu (the header's user menu) */
const offMenu = [pagePaths.account];

describe("every page of every menu in Chromium", () => {
  for (const a of accounts) {
    it(`shows ${a.role}'s pages without sideways scrolling at 390 px and without accessibility violations`, async () => {
      const { page } = env.browser;
      await forgetSessions(page);
      await page.setViewportSize(DESKTOP);
      await signInThroughProvider(page, env.stack.url, a.username, DEMO_PASSWORD);
      const problems: string[] = [];
      for (const item of [...navItems.filter((n) => n.roles.includes(a.role)), ...offMenu.map((to) => ({ to }))]) {
        await page.setViewportSize(DESKTOP);
        await page.goto(`${env.stack.url}${item.to}`, { waitUntil: "networkidle" });
        await page.getByRole("heading", { level: 1 }).first().waitFor({ timeout: 60_000 });
        // charts and tables that arrive after the heading
        await page.waitForLoadState("networkidle");
        await page.waitForFunction(() => !document.querySelector('[aria-busy="true"], [role="status"][aria-label^="Loading"]'), null, { timeout: 60_000 }).catch(() => undefined);
        for (const v of await axeViolations(page)) problems.push(`${item.to} (desktop): ${v.id} — ${v.help} — ${v.nodes.join(" | ")}`);
        await page.setViewportSize(PHONE);
        await page.waitForTimeout(300);
        const over = await sidewaysOverflow(page);
        if (over > 0) problems.push(`${item.to} (390 px): the page scrolls ${over} px sideways`);
        await env.browser.screenshot(`every-page-${a.role}${item.to.replace(/\//g, "-")}-390px`);
      }
      await page.setViewportSize(DESKTOP);
      expect(problems).toEqual([]);
    }, 600_000);
  }
});
