import { describe, expect, it } from "vitest";
import { parseBLife, readLifeParams } from "../../../src/features/life/life-params";

describe("parseBLife(text)", () => {
  it("accepts whole numbers from 1 to 50 and refuses the rest in words (the API's own range, shared/schemas/analytics-life.ts)", () => {
    expect(parseBLife(" 25 ")).toEqual({ value: 25 });
    expect(parseBLife("1")).toEqual({ value: 1 });
    expect(parseBLife("50")).toEqual({ value: 50 });
    expect(parseBLife("0")).toEqual({ error: "B-life runs from B1 to B50." });
    expect(parseBLife("51")).toEqual({ error: "B-life runs from B1 to B50." });
    expect(parseBLife("2.5")).toEqual({ error: "Type a whole number from 1 to 50." });
    expect(parseBLife("")).toEqual({ error: "Type a whole number from 1 to 50." });
  });
});

describe("readLifeParams(params, filterSearch)", () => {
  it("puts a B-life other than 10 into the life query and falls back to 10 for one out of range", () => {
    expect(new URLSearchParams(readLifeParams(new URLSearchParams("bLife=5"), "").lifeSearch).get("bLife")).toBe("5");
    expect(readLifeParams(new URLSearchParams("bLife=80"), "").bLife).toBe(10);
    expect(new URLSearchParams(readLifeParams(new URLSearchParams(""), "").lifeSearch).has("bLife")).toBe(false);
  });

  it("builds the rate comparison of the chosen groups for the part, but none for the climate split", () => {
    const p = readLifeParams(new URLSearchParams("component=ENG-CSA-HPLUG&compareBy=lot&compareValue=BT-2109"), "engineFamilies=K26-4R");
    expect(Object.fromEntries(new URLSearchParams(p.rateCompareSearch!))).toEqual({ engineFamilies: "K26-4R", compareBy: "lot", a: "BT-2109", component: "ENG-CSA-HPLUG" });
    expect(readLifeParams(new URLSearchParams("compareBy=climate&compareValue=cold&compareOther=mild"), "").rateCompareSearch).toBeNull();
  });
});
