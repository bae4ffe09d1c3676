/** npm run demo:generate -- --out DIR [--seed N] [--scale S]: writes the demo world's exports and manifest. */
import { Command, InvalidArgumentError } from "commander";
import { SingleBar, Presets } from "cli-progress";
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
  .parse();

const opts = program.opts<{ out: string; seed: number; scale: number }>();
const bar = new SingleBar({ format: "machines {bar} {value}/{total} {duration}s", hideCursor: true }, Presets.shades_classic);
const started = Date.now();
bar.start(1, 0);
const manifest = await generateDemo({
  ...opts,
  onProgress: (done, total) => {
    if (done === 1) bar.setTotal(total);
    bar.update(done);
  },
});
bar.stop();
const bytes = manifest.files.reduce((a, f) => a + f.bytes, 0);
console.log(`${manifest.files.length} files, ${manifest.machines} machines, ${(bytes / 1e6).toFixed(1)} MB in ${((Date.now() - started) / 1000).toFixed(1)} s → ${opts.out}`);
