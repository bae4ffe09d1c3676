import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { forgetSessions, openBrowser, signInThroughProvider, type Browser } from "../helpers/browser.js";
import { startTestStack, type TestStack } from "../helpers/test-stack.js";
import { DEMO_PASSWORD } from "../../server/auth/demo-accounts.js";

let stack: TestStack;
let browser: Browser;

beforeAll(async () => {
  stack = await startTestStack();
  browser = await openBrowser();
});
afterAll(async () => {
  await browser?.close();
  await stack?.stop();
});

const navLabels = async () =>
  (await browser.page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents()).map((s) => s.trim());

describe("signing in through the local provider in Chromium", () => {
  it("shows an admin the Users page in the navigation and lists them there", async () => {
    await signInThroughProvider(browser.page, stack.url, "admin", DEMO_PASSWORD);
    expect(await navLabels()).toContain("Users");
    await browser.page.getByRole("link", { name: "Users" }).click();
    await browser.page.getByRole("cell", { name: /Odile Varrow/ }).waitFor();
    await browser.screenshot("sign-in-admin-users");
  });

  it("ends both sessions at sign-out, so the next visit asks for a password again", async () => {
    await browser.page.getByRole("button", { name: /Odile Varrow/ }).click();
    await browser.page.getByRole("menuitem", { name: "Sign out" }).click();
    await browser.page.waitForURL(`${stack.url}/signed-out`);
    await browser.page.getByText("You are signed out.").waitFor();
    await browser.page.getByRole("link", { name: "Sign in" }).click();
    await browser.page.getByLabel("Password").waitFor(); // the provider's session ended too
    await browser.screenshot("sign-in-provider-page");
  });

  it("shows a shop manager their scope and no admin pages", async () => {
    await browser.page.getByLabel("Username").fill("manager.s5");
    await browser.page.getByLabel("Password").fill(DEMO_PASSWORD);
    await browser.page.getByRole("button", { name: "Sign in" }).click();
    await browser.page.getByRole("navigation", { name: "Main" }).waitFor();
    expect(await navLabels()).not.toContain("Users");
    await browser.page.getByRole("button", { name: /Ysolde Brack/ }).click();
    await browser.page.getByRole("menu").getByText("Shops: S5").waitFor();
    await browser.screenshot("sign-in-manager-overview");
  });

  it("refuses a wrong password with a message in words", async () => {
    await forgetSessions(browser.page);
    await browser.page.goto(stack.url + "/", { waitUntil: "networkidle" });
    await browser.page.getByRole("link", { name: "Sign in" }).click();
    await browser.page.getByLabel("Username").fill("analyst");
    await browser.page.getByLabel("Password").fill("wrong");
    await browser.page.getByRole("button", { name: "Sign in" }).click();
    await browser.page.getByRole("alert").getByText(/do not match/).waitFor();
  });

  it("logs no console errors on the way", () => {
    // the deliberate wrong password answers 401 on the provider's page; nothing else may fail
    expect(browser.consoleErrors.filter((e) => !/\/interaction\/[^/]+\/login$/.test(e) && !/status of 401/.test(e))).toEqual([]);
  });
});
