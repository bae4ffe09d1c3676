import { readdirSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { layouts } from "../../../etl/layouts.js";
import { resolveProfile } from "../../../etl/load/load-file.js";
import { listProfiles } from "../../../etl/profiles/registry.js";
import { components } from "../../../shared/catalog.js";

const samples = path.resolve(import.meta.dirname, "../../../etl/samples");
const componentCodes = new Set(components.map((c) => c.code));

describe("etl/profiles/*.json", () => {
  const profiles = listProfiles();
  it("has a generic profile per kind and at least three shop systems besides", () => {
    for (const k of Object.keys(layouts)) expect(profiles.map((p) => p.id)).toContain(`generic-${k}`);
    const systems = new Set(profiles.filter((p) => !p.id.startsWith("generic-")).map((p) => p.id.split("-")[0]));
    expect(systems.size).toBeGreaterThanOrEqual(3);
  });
  for (const p of profiles) {
    it(`${p.id} maps only canonical columns of its kind and only onto catalog component codes`, () => {
      for (const c of Object.keys(p.columns)) expect(layouts[p.kind] as readonly string[]).toContain(c);
      for (const code of Object.values(p.codes.component)) expect(componentCodes.has(code)).toBe(true);
    });
    it(`${p.id} has a sample in etl/samples whose header is detected as ${p.id}`, () => {
      expect(readdirSync(samples)).toContain(`${p.id}.csv`);
      expect(resolveProfile(path.join(samples, `${p.id}.csv`), {}).profile.id).toBe(p.id);
    });
  }
});
