import { afterAll, beforeAll, describe, expect, it } from "vitest";
import http from "node:http";
import type { AddressInfo } from "node:net";
import request from "supertest";
import { sql } from "kysely";
import { stringify } from "csv-stringify/sync";
import { testApp, type TestApp } from "../helpers/test-app.js";
import { csvCell } from "../../shared/csv-cell.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { repairCsvColumns, repairListQuerySchema } from "../../shared/schemas/repairs.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { listRepairs } from "../../server/db/queries/repairs.js";
import { CrlfRecordEnds } from "../../server/db/queries/repairs-csv.js";
import { up } from "../../migrations/0046_create_csv_cell_function.js";

// RFC 4180 quoting as csv-stringify writes it is the reference: the CSV that PostgreSQL's COPY writes must be
// byte for byte what csv-stringify writes from the same rows with the cell rule of shared/csv-cell.ts (OWASP,
// "CSV Injection") and \r\n record ends. Where the two writers differ on their own, the query makes up for it:
// COPY writes an empty string as "" (csv-stringify: nothing) and ends records with \n.
// One difference stays, on purpose: COPY quotes a cell holding a lone \n or \r, as csv-stringify does with its
// default options. The former writer set only record_delimiter "windows", with which csv-stringify quotes a cell
// for a \r\n but not for a lone \n or \r (its quote_record_delimiter then defaults to false), so such a cell
// went out bare and split its row for every reader that ends a record at a lone line feed.
let t: TestApp;
let analyst: string;
let managerS5: string;

/** Hostile or unusual values written into a few S5 lines (and their dimensions) before the comparisons. */
const hostile = {
  formula: "=1+1",
  negativeNumber: "-12.5",
  plus: "+x",
  at: "@a",
  tab: "\tstarts with a tab",
  commaQuoteNewline: 'a comma, a "quote" and\na new line',
  carriageReturn: "\rcarriage return first",
  loneMinus: "-",
  numberThenNewline: "-12.5\n",
  spaces: "  spaces around  ",
  crlfInside: "line one\r\nline two",
  loneQuote: '"',
  loneComma: ",",
  unicode: "ünïcödé – ✓",
  decimalComma: "12,5",
  exponent: "-1e5",
  unicodeMinus: "\u221212",
  backslashDot: "\\.",
  searched: "valve it's 50% \\ worn",
};

let ids: string[] = [];

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
  ids = (
    await sql<{ id: string }>`SELECT fl.repair_line_key::text AS id FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
      WHERE s.shop_code = 'S5' ORDER BY fl.repair_line_key LIMIT 7`.execute(t.db)
  ).rows.map((r) => r.id);
  const set = async (id: string, values: Record<string, string | number | null>) => {
    for (const [column, value] of Object.entries(values)) {
      await sql`UPDATE fact_repair_line SET ${sql.ref(column)} = ${value} WHERE repair_line_key = ${id}::bigint`.execute(t.db);
    }
  };
  const h = hostile;
  await set(ids[0], { complaint: h.formula, cause: h.negativeNumber, part_number: h.plus, supplier_lot: h.at, labor_hours: "12.50", hour_meter: "1000.0", standard_hours: "0.05" });
  await set(ids[1], { complaint: h.tab, cause: h.commaQuoteNewline, part_number: null, supplier_lot: "", hour_meter: null, labor_hours: "0", standard_hours: null });
  await set(ids[2], { complaint: "", cause: null, ro_number: "-7", closed_date: null, labor_hours: "-1.25" });
  await set(ids[3], { complaint: h.carriageReturn, cause: h.loneMinus, part_number: h.numberThenNewline, supplier_lot: h.spaces, labor_hours: "99999.99", hour_meter: "99999999.9" });
  await set(ids[4], { complaint: h.crlfInside, cause: h.loneQuote, part_number: h.loneComma, supplier_lot: h.unicode });
  await set(ids[5], { complaint: h.decimalComma, cause: h.exponent, part_number: h.unicodeMinus, supplier_lot: h.backslashDot });
  await set(ids[6], { complaint: h.searched });
  await sql`UPDATE dim_component SET name = '+Hydraulics, "main"' WHERE component_key = (SELECT component_key FROM fact_repair_line WHERE repair_line_key = ${ids[0]}::bigint)`.execute(t.db);
  await sql`UPDATE dim_machine SET serial = '@' || serial WHERE machine_key = (SELECT machine_key FROM fact_repair_line WHERE repair_line_key = ${ids[1]}::bigint)`.execute(t.db);
  await sql`UPDATE dim_technician SET tech_id = '=' || tech_id WHERE technician_key = (SELECT technician_key FROM fact_repair_line WHERE repair_line_key = ${ids[2]}::bigint)`.execute(t.db);
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

/** The raw bytes of a response, however it was compressed on the way. */
const bytes = (res: request.Response) => res.body as Buffer;
const download = (query: string, cookie: string) =>
  request(t.app)
    .get(`/api/repairs.csv?${query}`)
    .set("Cookie", cookie)
    .buffer(true)
    .parse((res, done) => {
      const parts: Buffer[] = [];
      res.on("data", (d: Buffer) => parts.push(d));
      res.on("end", () => done(null, Buffer.concat(parts)));
    });

/** The options the CSV was written with by csv-stringify, and the ones its bytes now equal (see the top). */
const formerOptions = { record_delimiter: "windows", bom: false } as const;
const referenceOptions = { ...formerOptions, quote_record_delimiter: true } as const;

/** The header and the records of the CSV: the same filter read by the list's query, each value through csvCell. */
async function records(query: string, scope: ShopScope): Promise<string[][]> {
  const params = Object.fromEntries(new URLSearchParams(query));
  const filters = analyticsFiltersSchema.parse(params);
  const list = repairListQuerySchema.parse(params);
  const filter = { filters, list: { q: list.q, lineType: list.lineType, payType: list.payType } };
  const { rows } = await listRepairs(t.db, scope, filter, { page: 1, pageSize: 10_000_000, sort: list.sort, dir: list.dir });
  return [repairCsvColumns.map((c) => c.label), ...rows.map((r) => repairCsvColumns.map((c) => csvCell(r[c.key])))];
}
const reference = async (query: string, scope: ShopScope) => Buffer.from(stringify(await records(query, scope), referenceOptions), "utf8");

/** Null when the two are equal; otherwise where they part, with a little of each around it. */
function firstDifference(ours: Buffer, theirs: Buffer) {
  if (ours.equals(theirs)) return null;
  let at = 0;
  while (at < ours.length && at < theirs.length && ours[at] === theirs[at]) at++;
  const around = (b: Buffer) => JSON.stringify(b.subarray(Math.max(0, at - 120), at + 120).toString("utf8"));
  return { at, lengths: [ours.length, theirs.length], ours: around(ours), reference: around(theirs) };
}

describe("GET /api/repairs.csv written by PostgreSQL", () => {
  const all: ShopScope = { kind: "all" };
  const s5: ShopScope = { kind: "shops", shops: ["S5"] };

  it.each([
    ["the whole warehouse in the default order", "", "analyst"],
    ["the whole warehouse by component", "sort=component&dir=asc", "analyst"],
    ["a manager's shop by labour, searched for a quote, a percent sign and a backslash", `sort=laborHours&dir=asc&q=${encodeURIComponent("it's 50% \\ worn")}`, "manager"],
    ["a manager's shop asked for every shop, by closing date, failures only", "shops=S1,S5&sort=closed&dir=asc&lineType=failure", "manager"],
    ["one shop's heater plugs by hour meter", "shops=S5&components=ENG-CSA-HPLUG&sort=hours&dir=desc", "analyst"],
  ])("holds the bytes csv-stringify wrote with the cell rule: %s", async (_label, query, who) => {
    const res = await download(query, who === "analyst" ? analyst : managerS5).expect(200);
    expect(res.headers["content-type"]).toBe("text/csv; charset=utf-8");
    const ours = bytes(res);
    const theirs = await reference(query, who === "analyst" ? all : s5);
    expect(theirs.length).toBeGreaterThan(200);
    expect(firstDifference(ours, theirs)).toBeNull();
  }, 120_000);

  it("writes each hostile cell as the rule does", async () => {
    const text = bytes(await download("shops=S5&sort=ro&dir=asc", analyst).expect(200)).toString("utf8");
    const h = hostile;
    for (const cell of [
      `'${h.formula}`, h.negativeNumber, `'${h.plus}`, `'${h.at}`, `'${h.tab}`, `"a comma, a ""quote"" and\na new line"`, `"'${h.carriageReturn}"`,
      `'${h.loneMinus}`, `"'-12.5\n"`, h.spaces, `"line one\r\nline two"`, `""""`, `","`, h.unicode, `"12,5"`, `'${h.exponent}`, h.unicodeMinus, h.backslashDot,
      `"'+Hydraulics, ""main"""`,
    ]) {
      expect(text).toContain(`,${cell},`);
    }
    // numbers as String(Number(v)): no trailing zeros, no exponent within the columns' range
    expect(text).toMatch(/,1000,12\.5,0\.05,/);
    expect(text).toMatch(/,99999999\.9,99999\.99,/);
    // an empty string and NULL are both an empty field, never ""
    const emptyLine = text.split("\r\n").find((l) => l.endsWith(`,${ids[2]}`))!;
    expect(emptyLine.startsWith("S5,-7,")).toBe(true);
    expect(emptyLine).toContain(",-1.25,");
    expect(emptyLine).not.toMatch(/(^|,)""(,|$)/);
  }, 120_000);

  it("differs from the former writer's bytes only in the records with a lone line feed or carriage return in a cell", async () => {
    // a cell the former writer left bare although it holds a line break: nothing else in it asks for quotes
    const bareBreak = (cell: string) => /\r(?!\n)|(?<!\r)\n/.test(cell) && !/[",]|\r\n/.test(cell);
    let differing = 0;
    for (const record of await records("shops=S5&sort=ro&dir=asc", s5)) {
      const same = stringify([record], formerOptions) === stringify([record], referenceOptions);
      expect(same).toBe(!record.some(bareBreak));
      if (!same) differing++;
    }
    expect(differing).toBe(1);
  });

  it("keeps the header, the file name and the compression of a text answer", async () => {
    const res = await download("shops=S5", analyst).set("Accept-Encoding", "gzip").expect(200);
    expect(res.headers["content-encoding"]).toBe("gzip");
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="?repair-lines\.csv"?$/);
    expect(bytes(res).toString("utf8").split("\r\n")[0]).toBe(repairCsvColumns.map((c) => c.label).join(","));
    expect(firstDifference(bytes(res), await reference("shops=S5", all))).toBeNull();
  });
});

describe("CrlfRecordEnds", () => {
  const csv = 'a,"b\nc",d\n"e""\n",f\n\n"",\n,"x\r\ny"\nlast,"""\n"""\n';
  const expected = 'a,"b\nc",d\r\n"e""\n",f\r\n\r\n"",\r\n,"x\r\ny"\r\nlast,"""\n"""\r\n';

  const run = async (chunks: Buffer[]) => {
    const out: Buffer[] = [];
    const ends = new CrlfRecordEnds();
    ends.on("data", (d: Buffer) => out.push(d));
    const done = new Promise((resolve) => ends.on("end", resolve));
    for (const c of chunks) ends.write(c);
    ends.end();
    await done;
    return Buffer.concat(out).toString("utf8");
  };

  it("ends records with \\r\\n and leaves a line break inside quotes alone, however the stream is cut", async () => {
    const whole = Buffer.from(csv);
    expect(await run([whole])).toBe(expected);
    for (let cut = 1; cut < whole.length; cut++) {
      expect(await run([whole.subarray(0, cut), whole.subarray(cut)])).toBe(expected);
    }
    expect(await run([...whole].map((b) => Buffer.from([b])))).toBe(expected);
  });
});

/** The COPY backends of this database other than ours: how they wait. */
const copies = async () =>
  (
    await sql<{ state: string; wait_event: string | null }>`SELECT state, wait_event FROM pg_stat_activity
      WHERE datname = current_database() AND pid <> pg_backend_pid() AND query LIKE 'COPY (%'`.execute(t.db)
  ).rows;
const until = async (what: string, test: () => Promise<boolean>, ms = 30_000) => {
  const end = Date.now() + ms;
  while (!(await test())) {
    if (Date.now() > end) throw new Error(`gave up waiting: ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
};

describe("GET /api/repairs.csv and the connection pool", () => {
  it("waits for a slow client, ends the COPY when the client leaves and leaks no connection", async () => {
    // long component names make the file far larger than every socket buffer on the way (about 50 MB)
    await sql`UPDATE dim_component SET name = name || repeat(' long', 300)`.execute(t.db);
    const server = t.app.listen(0, "127.0.0.1");
    await new Promise((resolve) => server.once("listening", resolve));
    try {
      const port = (server.address() as AddressInfo).port;
      // one more download than the pool has connections: a connection kept by any of them would stall the last
      for (let i = 0; i <= 5; i++) {
        let received = 0;
        const req = http.get({ host: "127.0.0.1", port, path: "/api/repairs.csv", headers: { cookie: analyst }, agent: false }, (res) => {
          expect(res.statusCode).toBe(200);
          res.once("data", (d: Buffer) => {
            received += d.length;
            res.pause();
          });
        });
        req.on("error", () => undefined);
        // the client reads nothing more: the server's COPY ends up waiting to write
        await until("the COPY waiting on the client", async () => (await copies()).some((c) => c.state === "active" && c.wait_event === "ClientWrite"));
        // the server can fill every buffer on the way before this process has taken its first chunk
        await until("the first bytes at the client", async () => received > 0);
        req.destroy();
        await until("the COPY gone", async () => (await copies()).length === 0);
        await until("every connection back in the pool", async () => t.pool.totalCount === t.pool.idleCount);
        expect(t.pool.waitingCount).toBe(0);
      }
    } finally {
      server.close();
      await sql`UPDATE dim_component SET name = left(name, length(name) - 1500)`.execute(t.db);
    }
    const after = await download("shops=S5&components=ENG-CSA-HPLUG", analyst).expect(200);
    expect(bytes(after).toString("utf8").split("\r\n").length).toBeGreaterThan(2);
  }, 300_000);
});

describe("GET /api/repairs.csv when the COPY cannot start", () => {
  it("answers 500 in the error envelope and gives its connection back", async () => {
    await sql`DROP FUNCTION csv_cell(text)`.execute(t.db);
    try {
      const res = await request(t.app).get("/api/repairs.csv?shops=S5").set("Cookie", analyst).expect(500);
      expect(res.body.error.code).toBe("internal");
      await until("every connection back in the pool", async () => t.pool.totalCount === t.pool.idleCount);
    } finally {
      await up(t.db);
    }
    await download("shops=S5", analyst).expect(200);
  });
});
