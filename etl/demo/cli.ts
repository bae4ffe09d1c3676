/**
 * npm run demo:generate -- --out DIR [--seed N] [--scale S] [--anchor YYYY-MM-DD]: writes the demo world's
 * exports and manifest, its history ending the day before the anchor (today by default).
 */
import { Command, InvalidArgumentError } from "commander";
import { SingleBar, Presets } from "cli-progress";
import { localToday, parseAnchor } from "./anchor.js";
import { generateDemo } from "./generate.js";

const number = (name: string, check: (n: number) => boolean) => (text: string): number => {
  const n = Number(text);
  if (!Number.isFinite(n) || !check(n)) throw new InvalidArgumentError(`${name} must be ${name === "seed" ? "a non-negative integer" : "a positive number"}`);
  return n;
};

const program = new Command()
  .name("demo:generate")
  .description("Write the invented demo world (SCENARIO.md) as shop exports plus manifest.json")
  .requiredOption("--out <dir>", "output directory")
  .option("--seed <n>", "random seed", number("seed", (n) => Number.isInteger(n) && n >= 0), 1)
  .option("--scale <s>", "multiplies the number of machines (1 = 4,000)", number("scale", (n) => n > 0), 1)
  .option("--anchor <date>", "the history ends the day before this date (YYYY-MM-DD; default today)", anchor)
  .parse();

function anchor(text: string): string {
  try {
    return parseAnchor(text);
  } catch (e) {
    throw new InvalidArgumentError((e as Error).message);
  }
}

const opts = program.opts<{ out: string; seed: number; scale: number; anchor?: string }>();
const bar = new SingleBar({ format: "machines {bar} {value}/{total} {duration}s", hideCursor: true }, Presets.shades_classic);
const started = Date.now();
bar.start(1, 0);
const manifest = await generateDemo({
  ...opts,
  anchor: opts.anchor ?? localToday(),
  onProgress: (done, total) => {
    if (done === 1) bar.setTotal(total);
    bar.update(done);
  },
});
bar.stop();
const bytes = manifest.files.reduce((a, f) => a + f.bytes, 0);
console.log(`${manifest.files.length} files, ${manifest.machines} machines, ${(bytes / 1e6).toFixed(1)} MB in ${((Date.now() - started) / 1000).toFixed(1)} s → ${opts.out}`);
const { years, padDays } = manifest.shift;
console.log(`History ${manifest.window.from} to ${manifest.window.to}, the day before the anchor ${manifest.anchor} (the generator's calendar moved ${years} year${Math.abs(years) === 1 ? "" : "s"}, then ${padDays} day${padDays === 1 ? "" : "s"} simulated on).`);
