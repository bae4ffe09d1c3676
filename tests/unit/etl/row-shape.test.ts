import { describe, expect, it } from "vitest";
import { layouts } from "../../../etl/layouts.js";
import { rowBuilder, stagedText } from "../../../etl/load/row-shape.js";
import { copyValue, stageColumns } from "../../../etl/load/staging.js";

// The compiled functions must give exactly what the plain loops give; the plain loops are the reference.
describe("rowBuilder", () => {
  it("puts each column's field under its name, and undefined for columns the file lacks", () => {
    const columns = layouts.jobs;
    // a file with every other column, in reverse order
    const present = columns.filter((_, i) => i % 2 === 0);
    const indexOf = new Map(present.map((c, i) => [c, present.length - 1 - i]));
    const fields = present.map((c) => `value of ${c}`).reverse();
    const plain: Record<string, string | undefined> = {};
    for (const c of columns) plain[c] = indexOf.has(c) ? fields[indexOf.get(c)!] : undefined;
    const row = rowBuilder(columns, indexOf)(fields);
    expect(row).toEqual(plain);
    expect(Object.keys(row)).toEqual([...columns]);
    expect(row.shop_code).toBe("value of shop_code");
    expect(row.ro_number).toBeUndefined();
  });

  it("refuses a column name that is not a plain identifier", () => {
    expect(() => rowBuilder(["ok", "not ok"], new Map())).toThrow(/not a column name/);
    expect(() => stagedText(["x); process.exit(1); ("])).toThrow(/not a column name/);
  });
});

describe("stagedText", () => {
  it("joins the COPY text of each column with tabs, as the plain loop does", () => {
    const columns = stageColumns.jobs.map(([n]) => n);
    const record: Record<string, unknown> = Object.fromEntries(columns.map((c, i) => [c, i % 5 === 0 ? null : i % 5 === 1 ? i * 1.5 : i % 5 === 2 ? i % 2 === 0 : `text ${i}`]));
    record.complaint = "tab\there, line\nbreak, back\\slash";
    record.cause = undefined;
    const plain = columns.map((c) => copyValue(record[c])).join("\t");
    const text = stagedText(columns)(record);
    expect(text).toBe(plain);
    expect(text.split("\t")).toHaveLength(columns.length);
    expect(text).toContain("tab\\there, line\\nbreak, back\\\\slash");
  });
});
