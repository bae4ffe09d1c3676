import { afterAll, beforeAll } from "vitest";
import { openBrowser, type Browser } from "./browser.js";
import { startTestStack, type TestStack } from "./test-stack.js";

/**
 * One product stack and one Chromium for a browser-test file: started before its tests, stopped after.
 * With `demo: true` the stack's database holds the demo world at scale 1.
 */
export function browserJourney(o: { demo?: boolean } = {}): { stack: TestStack; browser: Browser } {
  const env = {} as { stack: TestStack; browser: Browser };
  beforeAll(async () => {
    env.stack = await startTestStack({}, o);
    env.browser = await openBrowser();
  }, 600_000);
  afterAll(async () => {
    await env.browser?.close();
    await env.stack?.stop();
  });
  return env;
}
