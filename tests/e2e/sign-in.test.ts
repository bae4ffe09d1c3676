import { describe, expect, it } from "vitest";
import { forgetSessions, signInThroughProvider } from "../helpers/browser.js";
import { browserJourney } from "../helpers/browser-journey.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

const env = browserJourney();

const navLabels = async () =>
  (await env.browser.page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents()).map((s) => s.trim());

describe("signing in through the local provider in Chromium", () => {
  it("shows an admin the Users page in the navigation and lists them there", async () => {
    await signInThroughProvider(env.browser.page, env.stack.url, "admin", DEMO_PASSWORD);
    expect(await navLabels()).toContain("Users");
    await env.browser.page.getByRole("link", { name: "Users" }).click();
    await env.browser.page.getByRole("cell", { name: /^Odile Varrow/ }).waitFor();
    await env.browser.screenshot("sign-in-admin-users");
  });

  it("ends both sessions at sign-out, so the next visit asks for a password again", async () => {
    await env.browser.page.getByRole("button", { name: /^O Odile Varrow$/ }).click();
    await env.browser.page.getByRole("menuitem", { name: "Sign out" }).click();
    await env.browser.page.waitForURL(`${env.stack.url}/signed-out`);
    await env.browser.page.getByText("You are signed out.").waitFor();
    await env.browser.page.getByRole("link", { name: "Sign in" }).click();
    await env.browser.page.getByLabel("Password").waitFor(); // the provider's session ended too
    await env.browser.screenshot("sign-in-provider-page");
  });

  it("shows a shop manager their scope and no admin pages", async () => {
    await env.browser.page.getByLabel("Username").fill("manager.s5");
    await env.browser.page.getByLabel("Password").fill(DEMO_PASSWORD);
    await env.browser.page.getByRole("button", { name: "Sign in" }).click();
    await env.browser.page.getByRole("navigation", { name: "Main" }).waitFor();
    expect(await navLabels()).not.toContain("Users");
    await env.browser.page.getByRole("button", { name: /Ysolde Brack/ }).click();
    await env.browser.page.getByRole("menu").getByText("Shops: S5").waitFor();
    await env.browser.screenshot("sign-in-manager-overview");
  });

  it("refuses a wrong password with a message in words", async () => {
    await forgetSessions(env.browser.page);
    await env.browser.page.goto(env.stack.url + "/", { waitUntil: "networkidle" });
    await env.browser.page.getByRole("link", { name: "Sign in" }).click();
    await env.browser.page.getByLabel("Username").fill("analyst");
    await env.browser.page.getByLabel("Password").fill("wrong");
    await env.browser.page.getByRole("button", { name: "Sign in" }).click();
    await env.browser.page.getByRole("alert").getByText(/do not match/).waitFor();
  });

  it("logs no console errors on the way", () => {
    // the deliberate wrong password answers 401 on the provider's page; nothing else may fail
    expect(env.browser.consoleErrors.filter((e) => !/\/interaction\/[^/]+\/login$/.test(e) && !/status of 401/.test(e))).toEqual([]);
  });
});
