import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { parse } from "csv-parse/sync";
import { sql } from "kysely";
import { testApp, type TestApp } from "../helpers/test-app.js";
import type { RepairDetail, RepairList } from "../../shared/schemas/repairs.js";
import { repairSortKeys, type RepairSortKey } from "../../shared/schemas/repairs.js";

let t: TestApp;
let analyst: string;
let managerS5: string;

beforeAll(async () => {
  t = await testApp({ demo: true });
  analyst = await t.signInAs({ roles: ["analyst"] });
  managerS5 = await t.signInAs({ roles: ["manager"], shops: ["S5"] });
}, 600_000);
afterAll(async () => {
  await t?.drop();
});

const list = async (query: string, cookie = analyst): Promise<RepairList> =>
  (await request(t.app).get(`/api/repairs?${query}`).set("Cookie", cookie).expect(200)).body as RepairList;

const countWhere = async (where: string): Promise<number> =>
  Number(
    (await sql<{ n: string }>`SELECT count(*) AS n FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
      JOIN dim_component c ON c.component_key = fl.component_key JOIN dim_machine m ON m.machine_key = fl.machine_key
      WHERE ${sql.raw(where)}`.execute(t.db)).rows[0].n,
  );

describe("GET /api/repairs", () => {
  describe("without a session", () => {
    it("answers 401 in the error envelope", async () => {
      const res = await request(t.app).get("/api/repairs").expect(401);
      expect(res.body.error.code).toBe("unauthorized");
    });
  });

  describe("with a session that has no role", () => {
    it("answers 403", async () => {
      const nobody = await t.signInAs({ roles: [] });
      const res = await request(t.app).get("/api/repairs").set("Cookie", nobody).expect(403);
      expect(res.body.error.code).toBe("forbidden");
    });
  });

  describe("as the analyst", () => {
    it("pages on the server: the total is every line, pages do not overlap", async () => {
      const p1 = await list("pageSize=10&page=1");
      const p2 = await list("pageSize=10&page=2");
      expect(p1.total).toBe(await countWhere("TRUE"));
      expect(p1.rows).toHaveLength(10);
      expect(p2.rows).toHaveLength(10);
      const ids = new Set(p1.rows.map((r) => r.id));
      expect(p2.rows.some((r) => ids.has(r.id))).toBe(false);
      expect(typeof p1.rows[0].id).toBe("string");
    });

    it("sorts on the server by hour meter ascending and by opening date descending", async () => {
      const byHours = await list("pageSize=50&sort=hours&dir=asc&page=3");
      const hours = byHours.rows.map((r) => r.hourMeter!);
      expect(hours.every((h) => h !== null)).toBe(true);
      expect([...hours].sort((a, b) => a - b)).toEqual(hours);
      const byDate = await list("pageSize=50&sort=opened&dir=desc");
      const dates = byDate.rows.map((r) => r.openedDate);
      expect([...dates].sort().reverse()).toEqual(dates);
    });

    it("filters by the shared analytics filters, component and free text", async () => {
      const plugs = await list("components=ENG-CSA-HPLUG&lots=BT-2109&engineFamilies=K26-4R&pageSize=200");
      expect(plugs.total).toBeGreaterThan(0);
      expect(plugs.total).toBe(
        await countWhere("c.component_code = 'ENG-CSA-HPLUG' AND m.engine_family = 'K26-4R' AND (m.heater_plug_lot = 'BT-2109' OR fl.supplier_lot = 'BT-2109')"),
      );
      expect(plugs.rows.every((r) => r.componentCode === "ENG-CSA-HPLUG" && r.engineFamily === "K26-4R")).toBe(true);

      const winter = await list("from=2023-01-01&to=2023-01-31&shops=S2&pageSize=200");
      expect(winter.total).toBe(await countWhere("s.shop_code = 'S2' AND fl.opened_date BETWEEN '2023-01-01' AND '2023-01-31'"));
      expect(winter.rows.every((r) => r.shopCode === "S2" && r.openedDate.startsWith("2023-01"))).toBe(true);

      const ro = winter.rows[0].roNumber;
      const found = await list(`q=${encodeURIComponent(ro)}`);
      expect(found.rows.map((r) => r.roNumber)).toContain(ro);
      expect(found.total).toBeLessThan(winter.total + 50);
    });

    it("answers 400 in words for a bad sort key", async () => {
      const res = await request(t.app).get("/api/repairs?sort=colour").set("Cookie", analyst).expect(400);
      expect(res.body.error.message).toMatch(/sort/);
    });
  });

  describe("as the manager of S5", () => {
    it("lists only lines written by S5", async () => {
      const page = await list("pageSize=200", managerS5);
      expect(page.total).toBe(await countWhere("s.shop_code = 'S5'"));
      expect(page.rows.every((r) => r.shopCode === "S5")).toBe(true);
      const asked = await list("shops=S1&pageSize=5", managerS5);
      expect(asked.total).toBe(0);
    });
  });
});

describe("GET /api/repairs.csv", () => {
  const filter = "shops=S5&components=ENG-CSA-HPLUG&sort=opened&dir=asc";

  it("streams exactly the lines the same filter lists, in the same order", async () => {
    const res = await request(t.app).get(`/api/repairs.csv?${filter}`).set("Cookie", analyst).expect(200);
    expect(res.headers["content-type"]).toMatch(/text\/csv/);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    const json = await list(`${filter}&pageSize=200`);
    expect(json.total).toBeLessThanOrEqual(200);
    expect(rows.map((r) => r["Line id"])).toEqual(json.rows.map((r) => r.id));
    expect(rows.every((r) => r.Shop === "S5" && r["Component code"] === "ENG-CSA-HPLUG")).toBe(true);
  });

  it("neutralises cells that a spreadsheet would run as a formula", async () => {
    const victim = (await list(`${filter}&pageSize=5`)).rows[0];
    await sql`UPDATE fact_repair_line SET complaint = '=HYPERLINK("http://x.invalid")', cause = '@SUM(A1)' WHERE repair_line_key = ${victim.id}::bigint`.execute(t.db);
    const res = await request(t.app).get(`/api/repairs.csv?${filter}`).set("Cookie", analyst).expect(200);
    const row = (parse(res.text, { columns: true }) as Record<string, string>[]).find((r) => r["Line id"] === victim.id)!;
    expect(row.Complaint).toBe(`'=HYPERLINK("http://x.invalid")`);
    expect(row.Cause).toBe("'@SUM(A1)");
  });

  it("gives a manager only their shop even when asked for another", async () => {
    const res = await request(t.app).get("/api/repairs.csv?shops=S1&components=ENG-CSA-HPLUG").set("Cookie", managerS5).expect(200);
    expect(parse(res.text, { columns: true })).toHaveLength(0);
    await request(t.app).get("/api/repairs.csv").expect(401);
  });
});

describe("GET /api/repairs/:id", () => {
  const lineWith = async (where: string) =>
    (await sql<{ id: string }>`SELECT fl.repair_line_key::text AS id FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
      WHERE ${sql.raw(where)} ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db)).rows[0].id;

  it("returns the line with machine, hour trail, fault codes and raw and canonical measurements", async () => {
    const id = await lineWith("EXISTS (SELECT 1 FROM fact_measurement x WHERE x.repair_line_key = fl.repair_line_key AND x.kind = 'compression') AND EXISTS (SELECT 1 FROM fact_fault_code f WHERE f.repair_line_key = fl.repair_line_key)");
    const d = (await request(t.app).get(`/api/repairs/${id}`).set("Cookie", analyst).expect(200)).body as RepairDetail;
    expect(d.line.id).toBe(id);
    expect(d.machine.hoursTrail.length).toBeGreaterThan(0);
    const compression = d.measurements.filter((m) => m.kind === "compression");
    expect(compression.length).toBeGreaterThan(0);
    expect(compression.every((m) => m.unit === "psi" && m.rawValue.length > 0 && m.conversionRule.length > 0)).toBe(true);
    expect(d.faultCodes[0].fmiMeaning.length).toBeGreaterThan(5);
  });

  it("answers 404 in words for an unknown or malformed id", async () => {
    const res = await request(t.app).get("/api/repairs/123").set("Cookie", analyst).expect(404);
    expect(res.body.error.message).toMatch(/no repair line 123/);
    await request(t.app).get("/api/repairs/not-a-number").set("Cookie", analyst).expect(404);
  });

  it("answers a manager 404 for another shop's line and 200 for their own", async () => {
    const s1 = await lineWith("s.shop_code = 'S1'");
    const s5 = await lineWith("s.shop_code = 'S5'");
    await request(t.app).get(`/api/repairs/${s1}`).set("Cookie", analyst).expect(200);
    const res = await request(t.app).get(`/api/repairs/${s1}`).set("Cookie", managerS5).expect(404);
    expect(res.body.error.code).toBe("repair_not_found");
    const own = (await request(t.app).get(`/api/repairs/${s5}`).set("Cookie", managerS5).expect(200)).body as RepairDetail;
    expect(own.line.shopCode).toBe("S5");
    expect(own.machineHistory.every((h) => h.shopCode === "S5")).toBe(true);
  });
});

describe("GET /api/repairs by cursor", () => {
  // The list's documented order per sort: the sort column, then the tiebreakers, all in the sort's direction,
  // empty cells last either way; the walk through nextCursor must give exactly this, row for row.
  const orderOf: Record<RepairSortKey, string[]> = {
    opened: ["fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    ro: ["fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    closed: ["fl.closed_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    hours: ["fl.hour_meter", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    laborHours: ["fl.labor_hours", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    payType: ["fl.pay_type", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    lineType: ["fl.line_type", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    shop: ["s.shop_code", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    serial: ["m.serial", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    model: ["m.model_line", "m.machine_key", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    engineFamily: ["m.engine_family", "m.machine_key", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
    component: ["c.name", "c.component_key", "fl.opened_date", "fl.ro_number", "fl.line_no", "fl.repair_line_key"],
  };
  const expectedIds = async (where: string, sort: RepairSortKey, dir: "asc" | "desc") =>
    (await sql<{ id: string }>`SELECT fl.repair_line_key::text AS id FROM fact_repair_line fl JOIN dim_shop s ON s.shop_key = fl.shop_key
      JOIN dim_component c ON c.component_key = fl.component_key JOIN dim_machine m ON m.machine_key = fl.machine_key
      WHERE ${sql.raw(where)} ORDER BY ${sql.raw(orderOf[sort].map((col) => `${col} ${dir.toUpperCase()} NULLS LAST`).join(", "))}`.execute(t.db)).rows.map((r) => r.id);

  /** Every page from the first through nextCursor; each page is checked against its neighbours' cursors. */
  const walk = async (query: string, cookie = analyst) => {
    const pages: RepairList[] = [await list(query, cookie)];
    while (pages.at(-1)!.nextCursor) pages.push(await list(`${query}&cursor=${pages.at(-1)!.nextCursor}`, cookie));
    return pages;
  };

  // broad (more lines than a page is cut from by sorting: the order's index or the groups are walked) and narrow
  const filters = [
    { query: "from=2023-01-01&to=2024-06-30", where: "fl.opened_date BETWEEN '2023-01-01' AND '2024-06-30'" },
    { query: "shops=S2&components=ENG-CSA-HPLUG,HYD-LIN-HOSE", where: "s.shop_code = 'S2' AND c.component_code IN ('ENG-CSA-HPLUG', 'HYD-LIN-HOSE')" },
  ];
  for (const f of filters) {
    it(`walks every line exactly once in order for every sort and direction (${f.query})`, async () => {
      for (const sort of repairSortKeys) {
        for (const dir of ["asc", "desc"] as const) {
          const pages = await walk(`${f.query}&sort=${sort}&dir=${dir}&pageSize=200`);
          const ids = pages.flatMap((p) => p.rows.map((r) => r.id));
          expect(ids, `${sort} ${dir}`).toEqual(await expectedIds(f.where, sort, dir));
          expect(pages.map((p) => p.page)).toEqual(pages.map((_, i) => i + 1));
          expect(pages.every((p) => p.total === ids.length && !p.totalIsEstimate)).toBe(true);
          expect(pages[0].prevCursor).toBeNull();
        }
      }
    }, 600_000);
  }

  it("is broad enough in the first filter to walk the indexes, not sort every line", async () => {
    expect(await countWhere("fl.opened_date BETWEEN '2023-01-01' AND '2024-06-30'")).toBeGreaterThan(10_000);
  });

  it("goes back through prevCursor to the same pages, and the first page has no way back", async () => {
    for (const sort of ["hours", "component"] as const) {
      const pages = await walk(`from=2023-01-01&to=2024-06-30&sort=${sort}&dir=desc&pageSize=200`);
      let back = pages.at(-1)!;
      for (let i = pages.length - 2; i >= 0; i--) {
        back = await list(`from=2023-01-01&to=2024-06-30&sort=${sort}&dir=desc&pageSize=200&cursor=${back.prevCursor}`);
        expect(back.rows.map((r) => r.id)).toEqual(pages[i].rows.map((r) => r.id));
        expect(back.page).toBe(i + 1);
      }
      expect(back.prevCursor).toBeNull();
    }
  }, 120_000);

  it("answers 400 in words for a garbled, forged or mismatched cursor", async () => {
    const good = (await list("sort=opened&dir=desc&pageSize=5")).nextCursor!;
    const forge = (o: unknown) => Buffer.from(JSON.stringify(o)).toString("base64url");
    const decoded = JSON.parse(Buffer.from(good, "base64url").toString("utf8")) as { values: string[] };
    const bad = [
      "not a cursor!",
      good.slice(0, good.length - 7),
      forge({ sort: "opened", dir: "desc", toward: "after", page: 2 }),
      forge({ ...decoded, values: ["2023-02-30", ...decoded.values.slice(1)] }),
      forge({ ...decoded, values: ["2023-01-01'; DROP TABLE fact_repair_line; --", ...decoded.values.slice(1)] }),
      forge({ ...decoded, values: [...decoded.values.slice(0, -1), "99999999999999999999"] }),
      forge({ ...decoded, values: decoded.values.slice(1) }),
      forge({ ...decoded, toward: "sideways" }),
    ];
    for (const cursor of bad) {
      const res = await request(t.app).get(`/api/repairs?sort=opened&dir=desc&cursor=${encodeURIComponent(cursor)}`).set("Cookie", analyst).expect(400);
      expect(res.body.error.code).toBe("invalid_cursor");
      expect(res.body.error.message).toMatch(/cursor .*first page/);
      expect(res.body.error.requestId).toBeTruthy();
    }
    const otherSort = await request(t.app).get(`/api/repairs?sort=hours&dir=desc&cursor=${good}`).set("Cookie", analyst).expect(400);
    expect(otherSort.body.error.message).toMatch(/sorted by opened/);
  });

  it("answers 400 in words for a page number beyond the reach of numbers", async () => {
    const res = await request(t.app).get("/api/repairs?page=2000&pageSize=25").set("Cookie", analyst).expect(400);
    expect(res.body.error.message).toMatch(/nextCursor/);
  });

  it("counts exactly and says so when the filter is narrow", async () => {
    const narrow = await list("shops=S2&lineType=failure&pageSize=5");
    expect(narrow.totalIsEstimate).toBe(false);
    expect(narrow.total).toBe(await countWhere("s.shop_code = 'S2' AND fl.line_type = 'failure'"));
  });

  it("gives a manager only their shops' lines through every page and through a cursor made for the whole group", async () => {
    const pages = await walk("sort=serial&dir=asc&pageSize=200", managerS5);
    const ids = pages.flatMap((p) => p.rows.map((r) => r.id));
    expect(ids).toEqual(await expectedIds("s.shop_code = 'S5'", "serial", "asc"));
    const groupWide = (await list("sort=shop&dir=asc&pageSize=5")).nextCursor!;
    const viaForeignCursor = await list(`sort=shop&dir=asc&pageSize=200&cursor=${groupWide}`, managerS5);
    expect(viaForeignCursor.rows.length).toBeGreaterThan(0);
    expect(viaForeignCursor.rows.every((r) => r.shopCode === "S5")).toBe(true);
  }, 120_000);
});

describe("GET /api/repairs.csv of a whole filter", () => {
  it("holds exactly the lines of the filter in list order, streamed past many batches", async () => {
    const res = await request(t.app).get("/api/repairs.csv?sort=laborHours&dir=desc").set("Cookie", analyst).expect(200);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="?repair-lines\.csv"?$/);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    const all = await countWhere("TRUE");
    expect(all).toBeGreaterThan(10_000);
    expect(rows.map((r) => r["Line id"])).toEqual(
      (await sql<{ id: string }>`SELECT repair_line_key::text AS id FROM fact_repair_line
        ORDER BY labor_hours DESC NULLS LAST, ro_number DESC, line_no DESC, repair_line_key DESC`.execute(t.db)).rows.map((r) => r.id),
    );
  }, 120_000);

  it("gives a manager every line of their shops and no other", async () => {
    const res = await request(t.app).get("/api/repairs.csv?sort=opened&dir=asc").set("Cookie", managerS5).expect(200);
    const rows = parse(res.text, { columns: true }) as Record<string, string>[];
    expect(rows.length).toBe(await countWhere("s.shop_code = 'S5'"));
    expect(rows.every((r) => r.Shop === "S5")).toBe(true);
  }, 120_000);
});
