import type { AddressInfo } from "node:net";
import express from "express";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startAnswerWarmer } from "../../server/services/answer-warmer.js";
import { testApp, type TestApp } from "../helpers/test-app.js";

let t: TestApp;
beforeAll(async () => {
  t = await testApp();
}, 120_000);
afterAll(async () => t?.drop());

const newBatch = (name: string) =>
  t.db
    .insertInto("etl_batch")
    .values({ file_name: name, sha256: "b".repeat(64), profile: "generic-jobs", kind: "jobs", shop_code: null, loaded_by: "test", status: "loaded", finished_at: new Date(), error_message: null })
    .execute();

describe("startAnswerWarmer", () => {
  it("asks for every listed answer once per data version, at start and again after a load", async () => {
    const hits: string[] = [];
    const app = express().get(/.*/, (req, res) => {
      hits.push(`${req.path}|${req.headers.cookie}`);
      res.json({});
    });
    const server = app.listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    const origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const warmer = startAnswerWarmer({ db: t.db, origin, cookie: async () => "who=warm-up", requests: ["/a", "/b"], intervalMs: 50 });
    try {
      await warmer.idle();
      expect(hits).toEqual(["/a|who=warm-up", "/b|who=warm-up"]);
      await new Promise((r) => setTimeout(r, 200)); // several ticks, nothing changed: nothing asked
      expect(hits).toHaveLength(2);
      await newBatch("warm-b");
      await expect.poll(() => hits.length, { timeout: 5000 }).toBe(4);
      expect(hits.slice(2)).toEqual(["/a|who=warm-up", "/b|who=warm-up"]);
    } finally {
      warmer.stop();
      server.close();
    }
  });
});
