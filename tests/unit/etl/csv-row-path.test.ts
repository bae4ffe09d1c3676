import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import fc from "fast-check";
import { stringify } from "csv-stringify/sync";
import { describe, expect, it } from "vitest";
import { EtlFatalError } from "../../../etl/errors.js";
import { freeTextColumns, RowStager } from "../../../etl/load/stage-row.js";
import { getProfile } from "../../../etl/profiles/registry.js";
import { readCsv, readLimits, splitMergedLines, type CsvRecord } from "../../../etl/sources/read-csv.js";

/**
 * The CSV → staged-row path without a database, tried on random exports with random corruptions
 * (property-based, fast-check): every data line of a file becomes exactly one staged row, accepted or
 * rejected with its own line number, and no staged row carries a byte PostgreSQL's COPY would refuse.
 */
const profile = getProfile("generic-jobs");
const HEADER = Object.values(profile.columns);
const dir = mkdtempSync(path.join(os.tmpdir(), "csv-row-path-"));
let fileNo = 0;

async function stage(bytes: Buffer): Promise<{ records: CsvRecord[]; staged: string[] }> {
  const file = path.join(dir, `f${++fileNo}.csv`);
  writeFileSync(file, bytes);
  const records: CsvRecord[] = [];
  const staged: string[] = [];
  let stager: RowStager | null = null;
  for await (const batch of readCsv(file, profile, undefined, undefined, (h) => freeTextColumns(profile, h))) {
    for (const rec of batch) {
      if (!stager) {
        stager = new RowStager("jobs", profile, rec.fields, undefined, "2025-06-30", new Set(["S4", "S5"]));
        continue;
      }
      records.push(rec);
      staged.push(stager.line(rec));
    }
  }
  return { records, staged };
}

/** A plausible job row: short texts that may hold the delimiter, quotes and non-ASCII letters. */
const text = fc.string({ unit: fc.constantFrom(..."abcXYZ 0189,.-'\"°éø–"), maxLength: 12 });
const jobRow = fc.record({
  shop: fc.constantFrom("S4", "S5", "S9"),
  ro: fc.integer({ min: 1, max: 99999 }).map((n) => `R-${n}`),
  line: fc.integer({ min: 1, max: 20 }).map(String),
  complaint: text,
  cause: text,
  hours: fc.oneof(fc.integer({ min: 0, max: 20000 }).map(String), text),
});

function rowFields(r: { shop: string; ro: string; line: string; complaint: string; cause: string; hours: string }): string[] {
  const out = HEADER.map(() => "");
  const set = (col: string, v: string) => (out[HEADER.indexOf(profile.columns[col as keyof typeof profile.columns]!)] = v);
  set("shop_code", r.shop);
  set("ro_number", r.ro);
  set("line_no", r.line);
  set("serial", "KDLV-20001");
  set("opened_date", "2024-01-03");
  set("component_code", "ENG-CSA-HPLUG");
  set("complaint", r.complaint);
  set("cause", r.cause);
  set("hour_meter", r.hours);
  return out;
}

/** Corruptions a careless export or a hostile hand adds to one line's text. */
type Corruption = { kind: "none" } | { kind: "insert"; what: string; at: number } | { kind: "open-quote"; field: number } | { kind: "cut"; keep: number };
const corruption: fc.Arbitrary<Corruption> = fc.oneof(
  { weight: 4, arbitrary: fc.constant({ kind: "none" } as const) },
  fc.record({ kind: fc.constant("insert" as const), what: fc.constantFrom("\u0000", "\u0001", "\u001b", "\u007f", "\ufffd", "\u00a0", "\u200b"), at: fc.nat() }),
  fc.record({ kind: fc.constant("open-quote" as const), field: fc.nat({ max: 29 }) }),
  fc.record({ kind: fc.constant("cut" as const), keep: fc.nat() }),
);

function corrupt(line: string, c: Corruption): string {
  switch (c.kind) {
    case "none":
      return line;
    case "insert": {
      const at = c.at % (line.length + 1);
      return line.slice(0, at) + c.what + line.slice(at);
    }
    case "open-quote": {
      const cells = line.split(",");
      const i = c.field % cells.length;
      // a quote at the start of an unquoted field that nothing closes on this line
      if (cells[i].includes('"')) return line;
      cells[i] = `"${cells[i]}`;
      return cells.join(",");
    }
    case "cut":
      return line.slice(0, Math.max(1, c.keep % Math.max(1, line.length)));
  }
}

const COPY_FORBIDDEN = /\u0000/;

describe("the CSV → row path under random rows and corruptions (fast-check)", () => {
  it("turns every data line into exactly one staged row, in file order, with its own line number", { timeout: 120_000 }, async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(jobRow, corruption), { minLength: 1, maxLength: 25 }),
        fc.constantFrom("\n", "\r\n", "\r"),
        async (rows, eol) => {
          const lines = [HEADER.join(","), ...rows.map(([r, c]) => corrupt(stringify([rowFields(r)]).replace(/\r?\n$/, ""), c))];
          // lines that hold a line break of their own were never one line (a cut can't add one; the row's text has none)
          const bytes = Buffer.from(lines.join(eol) + eol, "utf8");
          const { records, staged } = await stage(bytes);
          // every data line read once, as its own row
          expect(records.map((r) => r.line)).toEqual(rows.map((_, i) => i + 2));
          expect(staged).toHaveLength(rows.length);
          staged.forEach((s, i) => {
            expect(s.startsWith(`${i + 2}\t`)).toBe(true);
            expect(s.endsWith("\n")).toBe(true);
            expect(s.slice(0, -1)).not.toMatch(/[\n\r]/);
            expect(s).not.toMatch(COPY_FORBIDDEN);
          });
          // a clean row of a registered shop with a whole hour meter is accepted; a line with a control byte never is
          rows.forEach(([r, c], i) => {
            const rejected = !staged[i].startsWith(`${i + 2}\t\\N\t`);
            if (c.kind === "insert" && /[\u0000\u0001\u001b\u007f\ufffd]/.test(c.what)) expect(rejected).toBe(true);
            if (c.kind === "none" && r.shop !== "S9" && /^\d+$/.test(r.hours)) expect(rejected).toBe(false);
          });
        },
      ),
      { numRuns: Number(process.env.FC_RUNS ?? 40), seed: process.env.FC_RUNS ? undefined : 20261202 },
    );
  });
});

describe("lines that a quote ran together", () => {
  it("reads each line on its own and names the span (worked by hand: a quote opened on line 5 of 13)", () => {
    const raw = ['1,"a', "2,b", "3,c", "4,d"].join("\n") + "\n";
    const split = splitMergedLines(raw, 8, 2, ",", false)!;
    expect(split.map((r) => [r.line, r.error === undefined, r.fields])).toEqual([
      [5, false, ['1,"a']],
      [6, true, ["2", "b"]],
      [7, true, ["3", "c"]],
      [8, true, ["4", "d"]],
    ]);
    expect(split[0].error).toMatch(/a quote on this line is never closed; its quoting ran lines 5–8 together/);
  });

  it("leaves a quoted field that holds a line break alone", () => {
    expect(splitMergedLines('1,"two\nlines"\n', 3, 2, ",", false)).toBeNull();
  });

  it("refuses the whole file when an open quote would hold more than the limit in memory", async () => {
    const saved = readLimits.pendingBytes;
    readLimits.pendingBytes = 200_000;
    try {
      const opened = stringify([rowFields({ shop: "S4", ro: "R-1", line: "1", complaint: "QQ", cause: "", hours: "1" })]).replace("QQ", '"never closed');
      const filler = stringify([rowFields({ shop: "S4", ro: "R-2", line: "1", complaint: "x", cause: "", hours: "1" })]);
      const bytes = Buffer.from(`${HEADER.join(",")}\n${opened}${filler.repeat(5000)}`, "utf8");
      // the filler rows hold no quote, so the one opened above runs on to the end of the file
      const err = await stage(bytes).then(() => null, (e: unknown) => e);
      expect(err).toBeInstanceOf(EtlFatalError);
      expect((err as EtlFatalError).code).toBe("UNBALANCED_QUOTE");
      expect((err as Error).message).toMatch(/run together as one row: a quote opened there is never closed/);
    } finally {
      readLimits.pendingBytes = saved;
    }
  });
});
