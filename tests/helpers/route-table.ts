import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type { Express } from "express";

/**
 * The routes an Express app serves, read from its router stack, and the route declarations in the server's
 * source, so an access test can require an expectation for every route without anyone listing them by hand.
 */

export interface AppRoute {
  /** upper case, "ALL" for router.all */
  method: string;
  /** the full path as declared, with its parameters (`/api/claims/:id`) */
  path: string;
}

export const routeKey = (r: AppRoute): string => `${r.method} ${r.path}`;

/** The part of an Express (router 2) layer this walk reads. */
interface Layer {
  name: string;
  rawPath?: string | RegExp | (string | RegExp)[];
  route?: { path: string | RegExp | (string | RegExp)[]; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
}

function join(prefix: string, p: string): string {
  const joined = `${prefix}/${p}`.replace(/\/{2,}/g, "/");
  return joined.length > 1 ? joined.replace(/\/$/, "") : joined;
}

function paths(p: Layer["rawPath"], where: string): string[] {
  const list = Array.isArray(p) ? p : [p ?? "/"];
  return list.map((x) => {
    if (typeof x !== "string") throw new Error(`${where} is mounted on a regular expression (${String(x)}); the route walk cannot name its paths`);
    return x;
  });
}

/**
 * Every route of the app: the routes of each router reached by walking `app.router.stack` into mounted
 * routers, with the mount paths joined. The same method and path declared twice (a limit on one route put in
 * front of the router that serves it) is one route. Middleware that is neither a route nor a router (session,
 * parsers, the 404 and error handlers) serves no route of its own and is skipped.
 */
export function appRoutes(app: Express): AppRoute[] {
  const found = new Map<string, AppRoute>();
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const methods = Object.keys(layer.route.methods)
          .filter((m) => layer.route!.methods[m])
          .map((m) => (m === "_all" ? "ALL" : m.toUpperCase()));
        for (const p of paths(layer.route.path, `a route under ${prefix || "/"}`)) {
          for (const method of methods) {
            const r = { method, path: join(prefix, p) };
            found.set(routeKey(r), r);
          }
        }
      } else if (layer.handle?.stack) {
        for (const p of paths(layer.rawPath, `a router under ${prefix || "/"}`)) walk(layer.handle.stack, join(prefix, p));
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, "");
  return [...found.values()].sort((a, b) => a.path.localeCompare(b.path) || a.method.localeCompare(b.method));
}

export interface DeclaredRoute {
  file: string;
  method: string;
  /** the path as written in the file, relative to wherever the file's router is mounted */
  path: string;
}

/**
 * Route declarations in the source of what `createApp` mounts: `router.<verb>("…")` in server/routes and
 * server/auth (as tests/api/cross-site.test.ts reads them) and `app.<verb>("…")` in server/app.ts. The
 * local identity provider (server/auth/dev-provider.ts) is a separate app and is left out.
 */
export function declaredRoutes(root: string): DeclaredRoute[] {
  const routerFiles = ["server/routes", "server/auth"].flatMap((d) =>
    readdirSync(path.join(root, d))
      .filter((f) => f.endsWith(".ts") && f !== "dev-provider.ts")
      .map((f) => `${d}/${f}`),
  );
  const read = (file: string, object: string) =>
    [...readFileSync(path.join(root, file), "utf8").matchAll(new RegExp(`\\b${object}\\.(get|post|put|patch|delete|all)\\(\\s*"([^"]+)"`, "g"))].map((m) => ({
      file,
      method: m[1].toUpperCase(),
      path: m[2],
    }));
  return [...routerFiles.flatMap((f) => read(f, "router")), ...read("server/app.ts", "app")];
}

/** True when a walked route can be the declaration: same method, and its full path ends with the declared one. */
export function servesDeclaration(r: AppRoute, d: DeclaredRoute): boolean {
  if (r.method !== d.method) return false;
  const tail = d.path.replace(/\/$/, "");
  return tail === "" || r.path.endsWith(tail.startsWith("/") ? tail : `/${tail}`);
}

export interface ShopMark {
  code: string;
  name: string;
}

/** Where a forbidden shop turned up in a body: the shop and the text that named it. */
export interface ShopMention {
  shop: string;
  by: "code" | "name";
  in: string;
}

const tokenPattern = (code: string) => new RegExp(`(^|[^A-Za-z0-9])${code.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}([^A-Za-z0-9]|$)`);

/**
 * Every mention of the given shops in these texts: a code as a token of its own ("S5", "S5-jobs.csv", not
 * "S50"), a name anywhere, in any case.
 */
export function shopMentions(texts: Iterable<string>, shops: readonly ShopMark[]): ShopMention[] {
  const tests = shops.map((s) => ({ s, code: tokenPattern(s.code), name: s.name.trim().toLowerCase() }));
  const out: ShopMention[] = [];
  for (const text of texts) {
    const lower = text.toLowerCase();
    for (const t of tests) {
      if (t.code.test(text)) out.push({ shop: t.s.code, by: "code", in: text.slice(0, 160) });
      else if (t.name && lower.includes(t.name)) out.push({ shop: t.s.code, by: "name", in: text.slice(0, 160) });
    }
  }
  return out;
}

/**
 * The strings of a parsed JSON value, keys included. An opaque cursor (a key ending in "Cursor") is base64url
 * of JSON: its decoded text is what it carries, so that is what is returned for it.
 */
export function jsonStrings(value: unknown): string[] {
  const out: string[] = [];
  const walk = (v: unknown, key: string | null) => {
    if (typeof v === "string") {
      out.push(key !== null && /cursor$/i.test(key) ? Buffer.from(v, "base64url").toString("utf8") : v);
    } else if (typeof v === "number" || typeof v === "boolean") {
      out.push(String(v));
    } else if (Array.isArray(v)) {
      for (const x of v) walk(x, null);
    } else if (v && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) {
        out.push(k);
        walk(x, k);
      }
    }
  };
  walk(value, null);
  return out;
}

/** Runs `work` over `items` with at most `limit` at a time; results in the items' order. */
export async function mapLimit<T, R>(items: readonly T[], limit: number, work: (item: T) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const lane = async () => {
    while (next < items.length) {
      const i = next++;
      out[i] = await work(items[i]);
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, lane));
  return out;
}
