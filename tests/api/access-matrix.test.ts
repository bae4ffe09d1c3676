import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { isDeepStrictEqual } from "node:util";
import { parse as parseCsv } from "csv-parse/sync";
import { sql } from "kysely";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiPaths } from "../../shared/api-paths.js";
import { benchLineId, benchSheetPaths } from "../../shared/schemas/bench-sheet.js";
import { digestApiPath } from "../../shared/schemas/digest.js";
import { engineSpecPaths } from "../../shared/schemas/engine-specs.js";
import { allRoles, groupWideRoles, type Role } from "../../shared/roles.js";
import { insertAttachment } from "../../server/db/queries/claims.js";
import { testApp, type TestApp } from "../helpers/test-app.js";
import {
  appRoutes, declaredRoutes, jsonStrings, mapLimit, routeKey, servesDeclaration, shopMentions, type ShopMark,
} from "../helpers/route-table.js";

// Who may reach what, for every route the app serves, tried with every role (and signed out), on a resource
// or filter of the caller's own shop and of another shop. The routes come from the app's router stack, so a
// new route fails this file until it has a line in ACCESS. A shop-limited caller must never see another
// shop's code or name in any answer, nor another shop's figures behind a shop filter. Common practice (deny
// by default; OWASP Authorization Cheat Sheet: "validate permissions on every request"), no further source.

const root = path.resolve(import.meta.dirname, "../..");
const OWN_ORIGIN = "http://127.0.0.1:8080"; // the test app's public URL (tests/helpers/test-app.ts)

/** The shop a limited role is given, another shop of the demo world, and a code no shop has. */
const OWN = "S1";
const OTHER = "S8";
const NOBODY = "Z9";

type Principal = "signed out" | Role;
const principals: readonly Principal[] = ["signed out", ...allRoles];
/** Roles whose scope is the shops they are given (a shop manager), not the whole group. */
const isLimited = (p: Principal) => p !== "signed out" && !groupWideRoles.includes(p);

/** Which shop a case is about: the caller's own (OWN), another (OTHER), or one that does not exist (NOBODY). */
type Side = "own" | "other" | "none";
const codeOf = (side: Side) => ({ own: OWN, other: OTHER, none: NOBODY })[side];

/** "as-empty": the answer equals what a group-wide role gets for a shop with no data, status and body. */
type Outcome = number | { own: number; other: number | "as-empty" };

interface Fixtures {
  /** a closed, covered heater-plug line of each shop, each held by a draft claim below */
  line: Record<"own" | "other", string>;
  claim: Record<"own" | "other", string>;
  attachment: Record<"own" | "other", string>;
  /** a cluster id of the scan filtered to each shop */
  cluster: Record<"own" | "other", string>;
  /** the lines above as the bench sheet names them (benchLineId) with what a new line would need */
  bench: Record<"own" | "other", { id: string; shopCode: string; roNumber: string; lineNo: number; serial: string; openedDate: string }>;
}

interface Req {
  path: string;
  body?: object;
  file?: { buffer: Buffer; name: string };
}

interface Entry {
  /**
   * How the route takes a shop: a shop's resource in the path or query ("resource"), a shop filter or shop
   * parameter ("filter"). Each role is then tried on the own shop and on the other one.
   */
  shop?: "resource" | "filter";
  req: (f: Fixtures, side: Side) => Req;
  expect: Record<Principal, Outcome>;
  /** a body the route's schema refuses, on an own-shop resource: 400 for allowed roles, still 401/403 for the rest */
  invalid?: (f: Fixtures) => Req;
  /** each case signs in afresh (the request ends its session) */
  fresh?: boolean;
}

const ALL: readonly Role[] = ["admin", "analyst", "director", "clerk", "manager", "technician"];
/** figures an administrator might type from a maker's manual (test input, psi) */
const ENGINE_SPEC = { unit: "psi", targetMin: 420, targetMax: 480, allowableMin: 380, plugHealthyMaxOhms: null, source: "engine section, table 2" };
/** the bench sheet: technicians and managers work their shops' lines, analysts and admins read (shared/roles.ts) */
const BENCH_READ: readonly Role[] = ["technician", "manager", "analyst", "admin"];
const BENCH_WRITE: readonly Role[] = ["technician", "manager"];
const ANALYTICS: readonly Role[] = ["admin", "analyst", "director", "clerk", "manager"];
/** the life curves: the page and its API serve the group-wide analysis roles only (shared/roles.ts lifeRoles) */
const LIFE: readonly Role[] = ["admin", "analyst", "director"];
/** the failure rates: the roles whose menu has the rates page (shared/roles.ts rateRoles) */
const RATES: readonly Role[] = ["admin", "analyst", "director", "manager"];
const BENCHMARKS: readonly Role[] = ["admin", "analyst", "director", "manager"];
const CLAIMS: readonly Role[] = ["clerk", "manager"];
const ADMIN: readonly Role[] = ["admin"];
const IMPORTS: readonly Role[] = ["admin", "analyst", "manager"];
const FINDINGS_READ: readonly Role[] = ["analyst", "director", "clerk", "admin"];
const FINDINGS_WORK: readonly Role[] = ["analyst", "director", "admin"];
/** the winter-readiness forecast and stock counts (shared/schemas/fitting-list.ts winterReadinessRoles) */
const WINTER: readonly Role[] = ["analyst", "director", "manager", "admin"];
/** a complete warranty policy (the seeded default's terms) for the policy routes */
const POLICY = {
  coverage: { base: { months: 24, hours: 2000 }, engine: { months: 36, hours: 3000 } },
  claimDays: 30,
  partRetentionDays: 60,
  warrantyEmail: "claims@warranty.ironledger.invalid",
};
/** an upload or batch id no caller has: past the role check the answer is 404 in words */
const NO_SUCH = "999999999";
/** a user id no one has signed in with */
const NO_SUCH_USER = "no-such-user";

const everyone = (status: number) => Object.fromEntries(principals.map((p) => [p, status])) as Record<Principal, Outcome>;

/**
 * 401 signed out, `ok` for the allowed roles and 403 for every other role (a role this table does not name is
 * refused). On a shop route a limited role gets `ok` on its own shop and `otherShop` on another.
 */
function gate(allowed: readonly Role[], ok: number, otherShop?: number | "as-empty"): Record<Principal, Outcome> {
  return Object.fromEntries(
    principals.map((p): [Principal, Outcome] => {
      if (p === "signed out") return [p, 401];
      if (!allowed.includes(p)) return [p, 403];
      return [p, isLimited(p) && otherShop !== undefined ? { own: ok, other: otherShop } : ok];
    }),
  ) as Record<Principal, Outcome>;
}

const filtered = (build: (search: string) => string) => (_f: Fixtures, side: Side) => ({ path: build(`shops=${codeOf(side)}`) });
const mine = (side: Side): "own" | "other" => (side === "other" ? "other" : "own");
const png = Buffer.from("89504e470d0a1a0a0000000d4948445200000001000000010806000000", "hex");

/** The expected answer of every route, by role and shop. A route missing here fails the first test. */
const ACCESS: Record<string, Entry> = {
  // public: sign-in starts (the test issuer never answers, so 503 in words), its callback without a pending
  // sign-in (400), the session probe and sign-out (a 303 to the signed-out page)
  "GET /auth/login": { req: () => ({ path: apiPaths.login() }), expect: everyone(503) },
  "GET /auth/callback": { req: () => ({ path: "/auth/callback?code=abc&state=def" }), expect: everyone(400) },
  "GET /auth/session": { req: () => ({ path: apiPaths.session() }), expect: everyone(200) },
  "POST /auth/logout": { req: () => ({ path: apiPaths.logout() }), expect: everyone(303), fresh: true },
  "GET /api/health": { req: () => ({ path: apiPaths.health() }), expect: everyone(200) },

  "GET /api/me": { req: () => ({ path: apiPaths.me() }), expect: gate(ALL, 200) },
  "GET /api/shops": { req: () => ({ path: apiPaths.shops() }), expect: gate(ALL, 200) },
  "GET /api/admin/users": { req: () => ({ path: apiPaths.adminUsers() }), expect: gate(ADMIN, 200) },
  // a user who never signed in: past the role check (and the body's rules) an admin gets 404 in words, and nothing changes
  "GET /api/admin/users/:sub/history": { req: () => ({ path: apiPaths.adminUserHistory(NO_SUCH_USER) }), expect: gate(ADMIN, 404) },
  "PUT /api/admin/users/:sub/access": {
    req: () => ({ path: apiPaths.adminUserAccess(NO_SUCH_USER), body: { roles: ["manager"], shops: [OWN] } }),
    expect: gate(ADMIN, 404),
    invalid: () => ({ path: apiPaths.adminUserAccess(NO_SUCH_USER), body: { roles: ["manager"], shops: [] } }),
  },
  "DELETE /api/admin/users/:sub/access": { req: () => ({ path: apiPaths.adminUserAccess(NO_SUCH_USER) }), expect: gate(ADMIN, 404) },
  "POST /api/admin/users/:sub/deactivate": { req: () => ({ path: apiPaths.adminUserDeactivate(NO_SUCH_USER) }), expect: gate(ADMIN, 404) },
  "POST /api/admin/users/:sub/reactivate": { req: () => ({ path: apiPaths.adminUserReactivate(NO_SUCH_USER) }), expect: gate(ADMIN, 404) },
  "GET /api/admin/shops": { req: () => ({ path: apiPaths.adminShops() }), expect: gate(ADMIN, 200) },
  // a code the demo world has already: an admin is told so (409) and nothing is added
  "POST /api/admin/shops": {
    req: () => ({ path: apiPaths.adminShops(), body: { code: OWN, name: "Second of its code" } }),
    expect: gate(ADMIN, 409),
    invalid: () => ({ path: apiPaths.adminShops(), body: { code: "S/1", name: "Bad code" } }),
  },
  "GET /api/admin/profiles": { req: () => ({ path: apiPaths.adminProfiles() }), expect: gate(ADMIN, 200) },
  "GET /api/admin/profiles/:id": { req: () => ({ path: apiPaths.adminProfile("generic-jobs") }), expect: gate(ADMIN, 200) },
  // a profile that exists already: an admin is told so (409) and nothing is added
  "POST /api/admin/profiles": {
    req: () => ({ path: apiPaths.adminProfiles(), body: { profile: { id: "generic-jobs", kind: "jobs", description: "copy", columns: { serial: "serial" } }, basedOn: null } }),
    expect: gate(ADMIN, 409),
    invalid: () => ({ path: apiPaths.adminProfiles(), body: { profile: { id: "Bad Name", kind: "jobs", description: "", columns: {} }, basedOn: null } }),
  },
  // a profile no one has: past the role check an admin gets 404 in words, and nothing changes
  "PUT /api/admin/profiles/:id": {
    req: () => ({ path: apiPaths.adminProfile("no-such-profile"), body: { profile: { id: "no-such-profile", kind: "jobs", description: "", columns: {} }, basedOn: 1 } }),
    expect: gate(ADMIN, 404),
    invalid: () => ({ path: apiPaths.adminProfile("generic-jobs"), body: { profile: { id: "generic-jobs", kind: "jobs", description: "", columns: { serial: " " } }, basedOn: 1 } }),
  },
  // no sample sent: an admin is told to choose one (400)
  "POST /api/admin/profiles/:id/test": { req: () => ({ path: apiPaths.adminProfileTest("generic-jobs") }), expect: gate(ADMIN, 400) },
  // a code no shop has: past the role check and the rules an admin gets 404 in words, and nothing changes
  "PUT /api/admin/shops/:code": {
    req: () => ({ path: apiPaths.adminShop(NOBODY), body: { name: "Nobody's shop" } }),
    expect: gate(ADMIN, 404),
    invalid: () => ({ path: apiPaths.adminShop(OWN), body: { name: "Own", timeZone: "Mars/Olympus" } }),
  },
  // the API tests run without the SMTP fake: an admin is told there is no captured mail (404 in words)
  "GET /api/admin/mail": { req: () => ({ path: apiPaths.adminMail() }), expect: gate(ADMIN, 404) },
  "GET /api/admin/warranty-policies": { req: () => ({ path: apiPaths.adminWarrantyPolicies() }), expect: gate(ADMIN, 200) },
  "GET /api/admin/warranty-policies/:family": { req: () => ({ path: apiPaths.adminWarrantyPolicy("*") }), expect: gate(ADMIN, 200) },
  // an edit started from a version that is not the latest: an admin is told to reopen the policy (409) and nothing is saved
  "PUT /api/admin/warranty-policies/:family": {
    req: () => ({ path: apiPaths.adminWarrantyPolicy("*"), body: { policy: POLICY, basedOn: 99, note: "access check" } }),
    expect: gate(ADMIN, 409),
    invalid: () => ({ path: apiPaths.adminWarrantyPolicy("*"), body: { policy: { ...POLICY, warrantyEmail: "not an address" }, basedOn: 1, note: "access check" } }),
  },
  // the group default has a policy already: an admin is told so (409) and nothing is added
  "POST /api/admin/warranty-policies": {
    req: () => ({ path: apiPaths.adminWarrantyPolicies(), body: { engineFamily: "*", policy: POLICY, note: "access check" } }),
    expect: gate(ADMIN, 409),
    invalid: () => ({ path: apiPaths.adminWarrantyPolicies(), body: { engineFamily: "NEW-1", policy: { ...POLICY, claimDays: 0 }, note: "access check" } }),
  },

  // the group's settings: every role reads them; an admin sets the currency (an ISO 4217 code, else 400 in words)
  "GET /api/settings": { req: () => ({ path: apiPaths.settings() }), expect: gate(ALL, 200) },
  "GET /api/admin/settings": { req: () => ({ path: apiPaths.adminSettings() }), expect: gate(ADMIN, 200) },
  "PUT /api/admin/settings": {
    req: () => ({ path: apiPaths.adminSettings(), body: { currency: "USD" } }),
    expect: gate(ADMIN, 200),
    invalid: () => ({ path: apiPaths.adminSettings(), body: { currency: "dollars" } }),
  },
  // the user's own weekly digest: every role reads its preview; a choice is stored only for a user who has
  // signed in (these sessions are minted without a stored user, so 409 in words), a wrong day is 400
  "GET /api/digest": { req: () => ({ path: digestApiPath }), expect: gate(ALL, 200) },
  "PUT /api/digest": {
    req: () => ({ path: digestApiPath, body: { enabled: true, weekday: 1 } }),
    expect: gate(ALL, 409),
    invalid: () => ({ path: digestApiPath, body: { enabled: true, weekday: 9 } }),
  },
  // winter readiness: the forecast, its backtest and the stock counts, a manager for their own shops only
  "GET /api/winter/forecast": { req: () => ({ path: "/api/winter/forecast" }), expect: gate(WINTER, 200) },
  "GET /api/winter/backtest": { req: () => ({ path: "/api/winter/backtest" }), expect: gate(WINTER, 200) },
  "GET /api/winter/stock": { req: () => ({ path: "/api/winter/stock" }), expect: gate(WINTER, 200) },
  "PUT /api/winter/stock": {
    shop: "resource",
    req: (_f, side) => ({ path: "/api/winter/stock", body: { shopCode: codeOf(side), partNumber: "KW26HP410", quantity: 2 } }),
    expect: gate(WINTER, 200, 403),
    invalid: () => ({ path: "/api/winter/stock", body: { shopCode: OWN, partNumber: "KW26HP410", quantity: -1 } }),
  },
  // the block-heater fitting list (JSON, CSV, printable PDF): always the caller's own shops, never a shop parameter
  "GET /api/winter/fitting": { req: () => ({ path: "/api/winter/fitting" }), expect: gate(WINTER, 200) },
  "GET /api/winter/fitting/list.csv": { req: () => ({ path: "/api/winter/fitting/list.csv" }), expect: gate(WINTER, 200) },
  "GET /api/winter/fitting/list.pdf": { req: () => ({ path: "/api/winter/fitting/list.pdf" }), expect: gate(WINTER, 200) },

  "GET /api/overview": { req: () => ({ path: apiPaths.overview() }), expect: gate(ANALYTICS, 200) },
  "GET /api/analytics/rates/hour-bands": { shop: "filter", req: filtered((s) => apiPaths.rates("hour-bands", s)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/rates/temperature-bands": { shop: "filter", req: filtered((s) => apiPaths.rates("temperature-bands", s)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/rates/components": { shop: "filter", req: filtered((s) => apiPaths.rates("components", s)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/rates/monthly": { shop: "filter", req: filtered((s) => apiPaths.rates("monthly", s)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/life/weibull": { shop: "filter", req: filtered((s) => apiPaths.life("weibull", s)), expect: gate(LIFE, 200, "as-empty") },
  "GET /api/analytics/life/kaplan-meier": { shop: "filter", req: filtered((s) => apiPaths.life("kaplan-meier", s)), expect: gate(LIFE, 200, "as-empty") },
  "GET /api/analytics/life/mcf": { shop: "filter", req: filtered((s) => apiPaths.life("mcf", s)), expect: gate(LIFE, 200, "as-empty") },
  "GET /api/analytics/life/cost-mcf": { shop: "filter", req: filtered((s) => apiPaths.lifeCostMcf(s)), expect: gate(LIFE, 200, "as-empty") },
  "GET /api/analytics/rates/compare": { shop: "filter", req: filtered((s) => apiPaths.rateCompare(`compareBy=engineFamily&a=K18-3G&b=K26-4R&${s}`)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/rates/costs": { shop: "filter", req: filtered((s) => apiPaths.costRates(s)), expect: gate(RATES, 200, "as-empty") },
  "GET /api/analytics/clusters": { shop: "filter", req: filtered((s) => apiPaths.clusters(s)), expect: gate(ANALYTICS, 200, "as-empty") },
  // a cluster of the scan filtered to a shop, asked for with the same filter: outside a manager's shops it is not in their scan
  "GET /api/analytics/clusters/:id": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.cluster(f.cluster[mine(side)], `shops=${codeOf(side)}`) }),
    expect: gate(ANALYTICS, 200, 404),
  },
  "GET /api/repairs": { shop: "filter", req: filtered((s) => apiPaths.repairs(s)), expect: gate(ANALYTICS, 200, "as-empty") },
  "GET /api/repairs.csv": { shop: "filter", req: filtered((s) => apiPaths.repairsCsv(s)), expect: gate(ANALYTICS, 200, "as-empty") },
  "GET /api/repairs/:id": { shop: "resource", req: (f, side) => ({ path: apiPaths.repair(f.line[mine(side)]) }), expect: gate(ANALYTICS, 200, 404) },

  "GET /api/benchmarks/shops": { req: () => ({ path: apiPaths.benchmarks("shops") }), expect: gate(BENCHMARKS, 200) },
  "GET /api/benchmarks/funnel": { req: () => ({ path: apiPaths.benchmarks("funnel") }), expect: gate(BENCHMARKS, 200) },
  "GET /api/benchmarks/trend": { req: () => ({ path: apiPaths.benchmarks("trend") }), expect: gate(BENCHMARKS, 200) },
  // the comeback pairs behind a shop's figure: a manager asking for another shop is refused, not told it is empty
  "GET /api/benchmarks/waits": { req: () => ({ path: apiPaths.benchmarks("waits") }), expect: gate(BENCHMARKS, 200) },
  "GET /api/benchmarks/fix-cycle": { req: () => ({ path: apiPaths.benchmarks("fix-cycle") }), expect: gate(BENCHMARKS, 200) },
  // the lines behind a shop's KPI, as JSON and CSV: a manager asking for another shop is refused, not told it is empty
  "GET /api/benchmarks/lines": { shop: "filter", req: (_f, side) => ({ path: apiPaths.benchmarks("lines", { kpi: "partsWait", shop: codeOf(side) }) }), expect: gate(BENCHMARKS, 200, 403) },
  "GET /api/benchmarks/lines.csv": { shop: "filter", req: (_f, side) => ({ path: apiPaths.benchmarks("lines.csv", { kpi: "backOrder", shop: codeOf(side) }) }), expect: gate(BENCHMARKS, 200, 403) },
  "GET /api/benchmarks/comebacks": { shop: "filter", req: (_f, side) => ({ path: apiPaths.benchmarks("comebacks", { shop: codeOf(side) }) }), expect: gate(BENCHMARKS, 200, 403) },

  "GET /api/claims": { req: () => ({ path: apiPaths.claims() }), expect: gate(CLAIMS, 200) },
  "GET /api/claims/candidates": { req: () => ({ path: apiPaths.claimCandidates() }), expect: gate(CLAIMS, 200) },
  "GET /api/claims/preview": { shop: "resource", req: (f, side) => ({ path: apiPaths.claimPreview(`repairLine=${f.line[mine(side)]}`) }), expect: gate(CLAIMS, 200, 404) },
  // the line already has its claim: an allowed caller who can see it is told so (409); nothing is made
  "POST /api/claims": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claims(), body: { kind: "repair", repairLineId: f.line[mine(side)] } }),
    expect: gate(CLAIMS, 409, 404),
    invalid: () => ({ path: apiPaths.claims(), body: { kind: "repair" } }),
  },
  "GET /api/claims/:id": { shop: "resource", req: (f, side) => ({ path: apiPaths.claim(f.claim[mine(side)]) }), expect: gate(CLAIMS, 200, 404) },
  // a draft cannot be credited: an allowed caller who can see the claim gets 409 and the claim stays a draft
  "POST /api/claims/:id/status": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimStatus(f.claim[mine(side)]), body: { to: "credited", amount: 100 } }),
    expect: gate(CLAIMS, 409, 404),
    invalid: (f) => ({ path: apiPaths.claimStatus(f.claim.own), body: { to: "paid-in-full" } }),
  },
  // the API tests run without object storage or mail: past the role and shop checks the answer is 503 in words
  "POST /api/claims/:id/attachments": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimAttachments(f.claim[mine(side)]), file: { buffer: png, name: "photo.png" } }),
    expect: gate(CLAIMS, 503, 404),
  },
  "GET /api/claims/:id/attachments/:attachmentId": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimAttachment(f.claim[mine(side)], f.attachment[mine(side)]) }),
    expect: gate(CLAIMS, 503, 404),
  },
  "GET /api/claims/:id/packet.pdf": { shop: "resource", req: (f, side) => ({ path: apiPaths.claimPacket(f.claim[mine(side)]) }), expect: gate(CLAIMS, 200, 404) },
  "GET /api/claims/:id/lines.csv": { shop: "resource", req: (f, side) => ({ path: apiPaths.claimLinesCsv(f.claim[mine(side)]) }), expect: gate(CLAIMS, 200, 404) },
  "POST /api/claims/:id/send": { shop: "resource", req: (f, side) => ({ path: apiPaths.claimSend(f.claim[mine(side)]) }), expect: gate(CLAIMS, 503, 404) },
  "GET /api/claims/money": { req: () => ({ path: apiPaths.claimMoney() }), expect: gate(CLAIMS, 200) },
  // the fixture claims hold covered lines: an allowed caller who can see the claim is told the line needs no reason (409)
  "POST /api/claims/:id/lines/:lineId/inclusion": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimLineInclusion(f.claim[mine(side)], f.line[mine(side)]), body: { include: true, reason: "cohort evidence" } }),
    expect: gate(CLAIMS, 409, 404),
    invalid: (f) => ({ path: apiPaths.claimLineInclusion(f.claim.own, f.line.own), body: { include: true } }),
  },
  // the fixture claims are drafts: an allowed caller who can see the claim is told only a rejected one is corrected (409)
  "POST /api/claims/:id/resubmit": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimResubmit(f.claim[mine(side)]), body: { correction: "hour meter photo added" } }),
    expect: gate(CLAIMS, 409, 404),
    invalid: (f) => ({ path: apiPaths.claimResubmit(f.claim.own), body: {} }),
  },
  "GET /api/claims/:id/story": { shop: "resource", req: (f, side) => ({ path: apiPaths.claimStory(f.claim[mine(side)]) }), expect: gate(CLAIMS, 200, 404) },
  "PUT /api/claims/:id/narrative": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimNarrative(f.claim[mine(side)]), body: { found: "Hard start when cold.", done: "", why: "" } }),
    expect: gate(CLAIMS, 200, 404),
    invalid: (f) => ({ path: apiPaths.claimNarrative(f.claim.own), body: { found: "x".repeat(4001), done: "", why: "" } }),
  },
  "POST /api/claims/:id/notes": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimNotes(f.claim[mine(side)]), body: { text: "Old plug kept for return." } }),
    expect: gate(CLAIMS, 201, 404),
    invalid: (f) => ({ path: apiPaths.claimNotes(f.claim.own), body: { text: "   " } }),
  },
  // the API tests run without object storage: past the role and shop checks a draft's attachment cannot be removed (503)
  "DELETE /api/claims/:id/attachments/:attachmentId": {
    shop: "resource",
    req: (f, side) => ({ path: apiPaths.claimAttachment(f.claim[mine(side)], f.attachment[mine(side)]) }),
    expect: gate(CLAIMS, 503, 404),
  },

  "GET /api/findings": { req: () => ({ path: apiPaths.findings() }), expect: gate(FINDINGS_READ, 200) },
  // a key no finding has: past the role check the answer is 404 in words
  "GET /api/findings/:key": { req: () => ({ path: apiPaths.finding("part=none;lot=none") }), expect: gate(FINDINGS_READ, 404) },
  "POST /api/findings/:key": {
    req: () => ({ path: apiPaths.finding("part=none;lot=none"), body: { status: "investigating" } }),
    expect: gate(FINDINGS_WORK, 404),
    invalid: () => ({ path: apiPaths.finding("part=none;lot=none"), body: { status: "dismissed" } }),
  },
  // the bench sheet: a search answers with the caller's shops' lines only; adding a line that is in the warehouse
  // already is refused in words (409) on an own shop and 403 on another; a sheet with an impossible value (9,000 psi)
  // is refused in words (422) and nothing is stored; another shop's line is not found (404)
  "GET /api/bench-sheet/lines": { req: () => ({ path: benchSheetPaths.search("00") }), expect: gate(BENCH_READ, 200) },
  "POST /api/bench-sheet/lines": {
    shop: "resource",
    req: (f, side) => {
      const b = f.bench[mine(side)];
      return { path: benchSheetPaths.lines(), body: { shopCode: b.shopCode, roNumber: b.roNumber, lineNo: b.lineNo, serial: b.serial, openedDate: b.openedDate, complaint: "Hard start when cold" } };
    },
    expect: gate(BENCH_WRITE, 409, 403),
    invalid: (f) => ({ path: benchSheetPaths.lines(), body: { shopCode: f.bench.own.shopCode, roNumber: "", lineNo: 0 } }),
  },
  "GET /api/bench-sheet/lines/:id": { shop: "resource", req: (f, side) => ({ path: benchSheetPaths.line(f.bench[mine(side)].id) }), expect: gate(BENCH_READ, 200, 404) },
  "PUT /api/bench-sheet/lines/:id/sheet": {
    shop: "resource",
    req: (f, side) => ({
      path: benchSheetPaths.sheet(f.bench[mine(side)].id),
      body: {
        readingDate: f.bench[mine(side)].openedDate, conditions: { ambient: null, engine: null, hourMeter: null }, railVoltage: null, preheatLamp: null,
        plugs: [], compression: { unit: "psi", cylinders: [{ position: 1, attempts: [9000] }] },
      },
    }),
    expect: gate(BENCH_WRITE, 422, 404),
    invalid: (f) => ({ path: benchSheetPaths.sheet(f.bench.own.id), body: { readingDate: "yesterday" } }),
  },

  // an engine family's own figures: administrators list, read and save them (an edit from a version that is not the
  // latest is told to reopen, 409, and nothing is saved); every signed-in role reads the figures readings are judged by
  "GET /api/admin/engine-specs": { req: () => ({ path: engineSpecPaths.adminList() }), expect: gate(ADMIN, 200) },
  "GET /api/admin/engine-specs/:family": { req: () => ({ path: engineSpecPaths.admin("K26-4R") }), expect: gate(ADMIN, 200) },
  "PUT /api/admin/engine-specs/:family": {
    req: () => ({ path: engineSpecPaths.admin("K26-4R"), body: { spec: ENGINE_SPEC, basedOn: 99, note: "access check" } }),
    expect: gate(ADMIN, 409),
    invalid: () => ({ path: engineSpecPaths.admin("K26-4R"), body: { spec: { ...ENGINE_SPEC, allowableMin: 500 }, basedOn: null, note: "access check" } }),
  },
  "GET /api/engine-specs/:family": { req: () => ({ path: engineSpecPaths.current("K26-4R") }), expect: gate(ALL, 200) },

  "GET /api/imports": { req: () => ({ path: apiPaths.imports() }), expect: gate(IMPORTS, 200) },
  "GET /api/imports/profiles": { req: () => ({ path: apiPaths.importProfiles() }), expect: gate(IMPORTS, 200) },
  // a form without a file: an allowed caller is told to choose one (400); nothing is stored
  "POST /api/imports": { req: () => ({ path: apiPaths.imports() }), expect: gate(IMPORTS, 400) },
  "GET /api/imports/:id": { req: () => ({ path: apiPaths.importItem(NO_SUCH) }), expect: gate(IMPORTS, 404) },
  "POST /api/imports/:id/check": { req: () => ({ path: apiPaths.importCheck(NO_SUCH), body: {} }), expect: gate(IMPORTS, 404) },
  "POST /api/imports/:id/load": { req: () => ({ path: apiPaths.importLoad(NO_SUCH) }), expect: gate(IMPORTS, 404) },
  "POST /api/imports/:id/cancel": { req: () => ({ path: apiPaths.importCancel(NO_SUCH) }), expect: gate(IMPORTS, 404) },
  "GET /api/imports/:id/file": { req: () => ({ path: apiPaths.importFile(NO_SUCH) }), expect: gate(IMPORTS, 404) },
  "GET /api/batches": { req: () => ({ path: apiPaths.batches() }), expect: gate(IMPORTS, 200) },
  "GET /api/batches/:id/rejects": { req: () => ({ path: apiPaths.batchRejects(NO_SUCH) }), expect: gate(IMPORTS, 404) },
  "GET /api/batches/:id/rejects.csv": { req: () => ({ path: apiPaths.batchRejectsCsv(NO_SUCH) }), expect: gate(IMPORTS, 404) },
};

interface Case {
  key: string;
  principal: Principal;
  /** null on a route that takes no shop; "invalid" for the refused-body case */
  side: "own" | "other" | "invalid" | null;
}

function casesOf(key: string, e: Entry): Case[] {
  const sides: Case["side"][] = [...(e.shop ? (["own", "other"] as const) : [null]), ...(e.invalid ? (["invalid"] as const) : [])];
  return principals.flatMap((principal) => sides.map((side) => ({ key, principal, side })));
}

function expected(e: Entry, c: Case): number | "as-empty" {
  const o = e.expect[c.principal];
  if (c.side === "invalid") {
    const valid = typeof o === "number" ? o : o.own;
    return valid === 401 || valid === 403 ? valid : 400;
  }
  if (typeof o === "number") return o;
  return c.side === "other" ? o.other : o.own;
}

const TOTAL = Object.entries(ACCESS).reduce((n, [k, e]) => n + casesOf(k, e).length, 0);

let t: TestApp;
let fx: Fixtures;
const cookies = new Map<Principal, string>();
/** the demo world's shops other than the one limited roles are given */
let otherShops: ShopMark[];
const work = mkdtempSync(path.join(tmpdir(), "ironledger-access-"));
let ran = 0;
const timing = { fixtures: 0, firstCase: Infinity, lastCase: 0 };

interface Answer {
  status: number;
  type: string;
  raw: Buffer;
}

const signIn = (p: Principal) => (p === "signed out" ? Promise.resolve(null) : t.signInAs({ roles: [p], shops: [OWN], name: `Test ${p}`, sub: `access-${p}-${Math.random().toString(36).slice(2, 8)}` }));

async function call(method: string, r: Req, cookie: string | null): Promise<Answer> {
  let q = request(t.app)[method.toLowerCase() as "get" | "post"](r.path);
  if (cookie) q = q.set("Cookie", cookie);
  if (method !== "GET") q = q.set("Origin", OWN_ORIGIN);
  if (r.file) q = q.attach("file", r.file.buffer, r.file.name);
  else if (r.body !== undefined) q = q.send(r.body);
  const res = await q.buffer(true).parse((stream, done) => {
    const chunks: Buffer[] = [];
    stream.on("data", (c: Buffer) => chunks.push(Buffer.from(c)));
    stream.on("end", () => done(null, Buffer.concat(chunks)));
  });
  return { status: res.status, type: String(res.headers["content-type"] ?? ""), raw: res.body as Buffer };
}

/** What an answer says, as comparable text pieces: JSON strings and keys, CSV cells, the PDF's text. */
function textsOf(a: Answer): string[] {
  if (a.raw.length === 0) return [];
  if (a.type.startsWith("application/json")) return jsonStrings(JSON.parse(a.raw.toString("utf8")));
  if (a.type.startsWith("text/csv")) return (parseCsv(a.raw, { relax_column_count: true }) as string[][]).flat();
  if (a.type.startsWith("application/pdf")) {
    const file = path.join(work, `${Math.random().toString(36).slice(2)}.pdf`);
    writeFileSync(file, a.raw);
    return [execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" })];
  }
  return [a.raw.toString("utf8")];
}

const sameAnswer = (a: Answer, b: Answer) =>
  a.status === b.status &&
  (a.type.startsWith("application/json") && b.type.startsWith("application/json")
    ? isDeepStrictEqual(JSON.parse(a.raw.toString("utf8")), JSON.parse(b.raw.toString("utf8")))
    : a.raw.equals(b.raw));

const describeAnswer = (a: Answer) => {
  if (!a.type.startsWith("application/json")) return `${a.type || "no body"}, ${a.raw.length} bytes`;
  const body = JSON.parse(a.raw.toString("utf8") || "null");
  return body?.error ? `${body.error.code}: ${body.error.message}` : "JSON";
};

async function pickLine(shop: string): Promise<string> {
  const res = await sql<{ key: string }>`
    SELECT fl.repair_line_key::text AS key
    FROM fact_repair_line fl
    JOIN dim_shop s ON s.shop_key = fl.shop_key
    JOIN dim_machine m ON m.machine_key = fl.machine_key
    JOIN dim_component c ON c.component_key = fl.component_key
    WHERE s.shop_code = ${shop} AND c.component_code = 'ENG-CSA-HPLUG' AND fl.closed_date IS NOT NULL
      AND fl.hour_meter IS NOT NULL AND fl.hour_meter <= 3000 AND m.delivery_date IS NOT NULL
      AND fl.opened_date <= (m.delivery_date + interval '36 months')::date
      AND NOT EXISTS (SELECT 1 FROM warranty_claim_line w WHERE w.repair_line_key = fl.repair_line_key)
    ORDER BY fl.repair_line_key LIMIT 1`.execute(t.db);
  if (!res.rows[0]) throw new Error(`the demo world has no claimable heater-plug line at ${shop}`);
  return res.rows[0].key;
}

async function benchLineOf(key: string): Promise<Fixtures["bench"]["own"]> {
  const r = await sql<{ shop_code: string; ro_number: string; line_no: number; serial: string; opened_date: string }>`
    SELECT s.shop_code, fl.ro_number, fl.line_no, m.serial, fl.opened_date FROM fact_repair_line fl
    JOIN dim_shop s ON s.shop_key = fl.shop_key JOIN dim_machine m ON m.machine_key = fl.machine_key
    WHERE fl.repair_line_key = ${key}::bigint`.execute(t.db);
  const x = r.rows[0]!;
  return { id: benchLineId(x.shop_code, x.ro_number, x.line_no), shopCode: x.shop_code, roNumber: x.ro_number, lineNo: x.line_no, serial: x.serial, openedDate: x.opened_date };
}

beforeAll(async () => {
  const start = Date.now();
  t = await testApp({ demo: true });
  for (const p of principals) {
    const c = await signIn(p);
    if (c) cookies.set(p, c);
  }
  const shops = await t.db.selectFrom("dim_shop").select(["shop_code as code", "name"]).orderBy("shop_code").execute();
  const codes = shops.map((s) => s.code);
  if (!codes.includes(OWN) || !codes.includes(OTHER) || codes.includes(NOBODY)) throw new Error(`the demo world's shops are ${codes.join(", ")}`);
  otherShops = shops.filter((s) => s.code !== OWN);

  const clerk = cookies.get("clerk")!;
  const analyst = cookies.get("analyst")!;
  const line = { own: await pickLine(OWN), other: await pickLine(OTHER) };
  const claim = { own: "", other: "" };
  const attachment = { own: "", other: "" };
  const cluster = { own: "", other: "" };
  for (const side of ["own", "other"] as const) {
    const made = await request(t.app).post(apiPaths.claims()).set("Cookie", clerk).set("Origin", OWN_ORIGIN).send({ kind: "repair", repairLineId: line[side] });
    if (made.status !== 201) throw new Error(`claim for ${line[side]}: ${made.status} ${made.text}`);
    claim[side] = made.body.id;
    attachment[side] = await insertAttachment(
      t.db,
      { claimId: claim[side], s3Key: `claims/${claim[side]}/photo.png`, contentType: "image/png", extension: "png", sizeBytes: png.length, originalName: "photo.png" },
      { sub: "access-clerk", name: "Test clerk" },
    );
    const scan = await request(t.app).get(apiPaths.clusters(`shops=${codeOf(side)}`)).set("Cookie", analyst).expect(200);
    if (!scan.body.clusters.length) throw new Error(`the scan of ${codeOf(side)} finds no cluster`);
    cluster[side] = scan.body.clusters[0].id;
  }
  const bench = { own: await benchLineOf(line.own), other: await benchLineOf(line.other) };
  fx = { line, claim, attachment, cluster, bench };
  timing.fixtures = Date.now() - start;
}, 600_000);

afterAll(async () => {
  const s = (ms: number) => `${(ms / 1000).toFixed(1)} s`;
  console.log(
    `access matrix: ${ran} of ${TOTAL} route × role × shop cases over ${Object.keys(ACCESS).length} routes and ${principals.length} callers; ` +
      `cases ${s(Math.max(0, timing.lastCase - timing.firstCase))}, database and fixtures ${s(timing.fixtures)}`,
  );
  await t?.drop();
  rmSync(work, { recursive: true, force: true });
});

describe("the access table", () => {
  it("has an entry for every route the app serves", () => {
    const missing = appRoutes(t.app).map(routeKey).filter((k) => !(k in ACCESS));
    expect(missing.map((k) => `${k}: add it to the access table (tests/api/access-matrix.test.ts)`)).toEqual([]);
  });

  it("names only routes the app serves", () => {
    const served = new Set(appRoutes(t.app).map(routeKey));
    expect(Object.keys(ACCESS).filter((k) => !served.has(k)).map((k) => `${k}: no longer served; remove it from the access table`)).toEqual([]);
  });

  it("reaches every route declared in the server's source (the walk of the router stack misses none)", () => {
    const served = appRoutes(t.app);
    const declared = declaredRoutes(root);
    expect(declared.length).toBeGreaterThanOrEqual(Object.keys(ACCESS).length / 2);
    const unreached = declared.filter((d) => !served.some((r) => servesDeclaration(r, d)));
    expect(unreached.map((d) => `${d.method} ${d.path} in ${d.file}`)).toEqual([]);
  });

  it("finds another shop's code and name in a group-wide answer (the scan for other shops can fail)", async () => {
    const shops = await call("GET", { path: apiPaths.shops() }, cookies.get("analyst")!);
    const named = new Set(shopMentions(textsOf(shops), otherShops).map((m) => `${m.shop} by ${m.by}`));
    expect([...named].sort()).toEqual(otherShops.flatMap((s) => [`${s.code} by code`, `${s.code} by name`]).sort());
    const csv = await call("GET", { path: apiPaths.repairsCsv(`shops=${OTHER}`) }, cookies.get("analyst")!);
    expect(shopMentions(textsOf(csv), otherShops).map((m) => m.shop)).toContain(OTHER);
    expect(shopMentions([`rows of ${otherShops[0].name.toUpperCase()}`], otherShops)).toEqual([{ shop: otherShops[0].code, by: "name", in: `rows of ${otherShops[0].name.toUpperCase()}` }]);
  });

  it("gives every role an outcome on every route", () => {
    const gaps = Object.entries(ACCESS).flatMap(([k, e]) => principals.filter((p) => e.expect[p] === undefined).map((p) => `${k}: ${p}`));
    expect(gaps).toEqual([]);
  });
});

// routes run a few at a time (vitest's maxConcurrency), each route's cases six at a time
describe.concurrent(`access by route, role and shop (${TOTAL} cases)`, () => {
  for (const [key, entry] of Object.entries(ACCESS)) {
    const cases = casesOf(key, entry);
    it(`${key}: ${cases.length} cases`, async ({ expect, onTestFinished }) => {
      timing.firstCase = Math.min(timing.firstCase, Date.now());
      onTestFinished(() => void (timing.lastCase = Math.max(timing.lastCase, Date.now())));
      const method = key.split(" ")[0];
      const problems: string[] = [];
      let empty: Promise<Answer> | null = null;
      const emptyAnswer = () => (empty ??= call(method, entry.req(fx, "none"), cookies.get("analyst")!));
      const run = async (c: Case) => {
        const r = c.side === "invalid" ? entry.invalid!(fx) : entry.req(fx, c.side ?? "own");
        const cookie = entry.fresh ? await signIn(c.principal) : (cookies.get(c.principal) ?? null);
        const a = await call(method, r, cookie);
        ran += 1;
        const where = `${c.principal}${c.side ? ` (${c.side} shop)` : ""} ${method} ${r.path}`;
        const want = expected(entry, c);
        if (want === "as-empty") {
          const e = await emptyAnswer();
          if (!sameAnswer(a, e)) problems.push(`${where}: expected the answer for a shop with no data (${e.status}), got ${a.status} (${describeAnswer(a)}) that differs from it`);
        } else if (a.status !== want) {
          problems.push(`${where}: expected ${want}, got ${a.status} (${describeAnswer(a)})`);
        }
        if (isLimited(c.principal)) {
          for (const m of shopMentions(textsOf(a), otherShops)) problems.push(`${where}: names shop ${m.shop} by ${m.by} in "${m.in}"`);
        }
        return { c, a };
      };
      // one caller of each scope first, so the others find its answer kept rather than all computing it at once
      const first = cases.filter((c) => c.principal === "analyst" || isLimited(c.principal));
      const answers = [...(await mapLimit(first, 6, run)), ...(await mapLimit(cases.filter((c) => !first.includes(c)), 6, run))];
      // the empty answer is a real test only where the other shop has data a group-wide role can see
      if (Object.values(entry.expect).some((o) => typeof o === "object" && o.other === "as-empty")) {
        const groupOther = answers.find(({ c }) => c.principal === "analyst" && c.side === "other")!.a;
        expect(groupOther.status).toBe(200);
        expect(sameAnswer(groupOther, await emptyAnswer()), `${key}: the analyst's answer for ${OTHER} equals the answer for a shop with no data`).toBe(false);
      }
      expect(problems).toEqual([]);
    });
  }
});
