import { describe, expect, it } from "vitest";
import { dashboardsFor, type BatchMark } from "../../../server/services/dashboards-current.js";
import type { WarmState } from "../../../server/services/answer-warmer.js";

const at = new Date("2026-12-02T14:05:00Z");
const warm = (batch: string | null, exposureBatch: string | null): WarmState => ({
  warmedFor: { version: `${batch ?? 0}@x#y`, batch, exposureBatch, refreshPending: false },
  finishedAt: at,
  warming: null,
});
const batch = (id: string, o: Partial<BatchMark> = {}): BatchMark => ({ id, status: "loaded", inserted: 10, updated: 0, ...o });

describe("dashboardsFor", () => {
  it("says nothing without a warm-up, or for a batch that did not load", () => {
    expect(dashboardsFor(batch("5"), undefined)).toBeNull();
    expect(dashboardsFor(batch("5", { status: "failed" }), warm("9", "9"))).toBeNull();
    expect(dashboardsFor(batch("5", { status: "running" }), warm("9", "9"))).toBeNull();
  });

  it("is updating until a warm pass has finished at all", () => {
    expect(dashboardsFor(batch("5"), { warmedFor: null, finishedAt: null, warming: null })).toEqual({ state: "updating", asOf: null });
  });

  it("is current once the warm answers were computed for data holding the batch and its exposure", () => {
    expect(dashboardsFor(batch("5"), warm("5", "5"))).toEqual({ state: "current", asOf: at.toISOString() });
    expect(dashboardsFor(batch("5"), warm("12", "12"))).toEqual({ state: "current", asOf: at.toISOString() });
  });

  it("is updating while the warm answers are for data before the batch", () => {
    expect(dashboardsFor(batch("5"), warm("4", "4"))).toEqual({ state: "updating", asOf: null });
  });

  it("is updating while the batch's lines are in but the exposure refresh has not folded them in", () => {
    expect(dashboardsFor(batch("5"), warm("5", "4"))).toEqual({ state: "updating", asOf: null });
    expect(dashboardsFor(batch("5"), warm("5", null))).toEqual({ state: "updating", asOf: null });
  });

  it("needs no refresh for a batch that changed no rows, or bytes loaded before", () => {
    expect(dashboardsFor(batch("5", { inserted: 0, updated: 0 }), warm("5", "4"))?.state).toBe("current");
    expect(dashboardsFor(batch("5", { status: "already_loaded", inserted: 0 }), warm("5", "4"))?.state).toBe("current");
  });

  it("compares batch ids as numbers, not as text", () => {
    expect(dashboardsFor(batch("10"), warm("9", "9"))?.state).toBe("updating");
    expect(dashboardsFor(batch("9"), warm("10", "10"))?.state).toBe("current");
  });
});
