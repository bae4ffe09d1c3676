import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { generateDemo, type Manifest } from "../../../etl/demo/generate.js";

const dirs: string[] = [];
async function run(seed: number): Promise<{ dir: string; manifest: Manifest }> {
  const dir = await mkdtemp(path.join(tmpdir(), "ironledger-demo-"));
  dirs.push(dir);
  return { dir, manifest: await generateDemo({ out: dir, seed, scale: 0.05 }) };
}
afterAll(async () => {
  await Promise.all(dirs.map((d) => rm(d, { recursive: true, force: true })));
});

describe("generateDemo({ out, seed, scale })", () => {
  it("writes identical files for the same seed and different ones for another seed", async () => {
    const a = await run(4);
    const b = await run(4);
    const c = await run(5);
    const hashes = (m: Manifest) => m.files.map((f) => [f.file, f.sha256]);
    expect(hashes(a.manifest)).toEqual(hashes(b.manifest));
    expect(await readFile(path.join(a.dir, "manifest.json"), "utf8")).toBe(await readFile(path.join(b.dir, "manifest.json"), "utf8"));
    expect(hashes(c.manifest)).not.toEqual(hashes(a.manifest));
  });

  it("lists the registry first, then hours, then each shop's weather, jobs and measurements", async () => {
    const { manifest } = await run(1);
    expect(manifest.machines).toBe(200);
    expect(manifest.files.slice(0, 2).map((f) => f.file)).toEqual(["machines.csv", "telematics-hours.csv"]);
    expect(manifest.files.slice(2, 5).map((f) => [f.file, f.kind, f.shop])).toEqual([
      ["S1-weather.csv", "weather", "S1"], ["S1-jobs.csv", "jobs", "S1"], ["S1-measurements.csv", "measurements", "S1"],
    ]);
    expect(manifest.files).toHaveLength(2 + 8 * 3);
    expect(manifest.files.find((f) => f.file === "S6-jobs.csv")!.profile).toBe("birch-jobs");
    expect(manifest.injected.meterReplacement).toBe(1);
  });
});
