import type { ComponentType } from "react";
import type { LoaderFunction, Params } from "react-router-dom";
import type { QueryClient } from "@tanstack/react-query";
import { meQueries } from "@/features/session/api/me-queries";
import { settingsQueries } from "@/lib/settings-queries";
import type { Me } from "@shared/schemas/me";
import type { Role } from "@shared/roles";
import { mayOpen, pageAccess, type PageKey } from "./navigation";

/**
 * Route loaders that prime TanStack Query's cache for a lazy page.
 *
 * A page module may export `primeCache` beside its `Component`: given the query client and what the URL
 * says, it starts the page's first queries with the same `queryOptions` factories the page reads. Returning
 * the `ensureQueryData` promise makes navigation wait for the data (and a refusal reach the route's error
 * boundary); starting `prefetchQuery` without returning it lets the page render at once and join the fetch.
 */
export interface PageUrl {
  params: Params;
  url: URL;
  me: Me;
}

export type PrimeCache = (qc: QueryClient, page: PageUrl) => Promise<unknown> | void;

interface PageModule {
  Component: ComponentType;
  primeCache?: PrimeCache;
}

/** Thrown by a page's loader when the signed-in roles are outside the page's roles; the area's boundary explains it. */
export class PageRefused extends Error {
  constructor(
    readonly page: PageKey,
    readonly roles: readonly Role[],
  ) {
    super(`${pageAccess[page].title} is not among the pages of your role.`);
    this.name = "PageRefused";
  }
}

/**
 * The route loader for a page. It waits for the session (the root loader asks for it at the same moment, so
 * this is one request), refuses a role the page does not serve before any of its data is asked for, and primes
 * nothing for a signed-out visitor: the layout asks them to sign in instead.
 */
function pageLoader(qc: QueryClient, page: PageKey, primeCache: PrimeCache | undefined): LoaderFunction {
  return async ({ params, request }) => {
    const me = await qc.ensureQueryData(meQueries.current());
    if (me && !mayOpen(page, me.roles)) throw new PageRefused(page, me.roles);
    // the group's settings (its currency) for useFormat, not awaited: the page never waits on them, and a failure leaves the fallback
    if (me) void qc.prefetchQuery(settingsQueries.current());
    if (me && primeCache) await primeCache(qc, { params, url: new URL(request.url), me });
    return null;
  };
}

/** A route's `lazy`: loads the page module, then hands React Router its component and the loader that checks the role and primes the cache. */
export function lazyPage(qc: QueryClient, page: PageKey, load: () => Promise<PageModule>) {
  return async (): Promise<{ Component: ComponentType; loader: LoaderFunction }> => {
    const { Component, primeCache } = await load();
    return { Component, loader: pageLoader(qc, page, primeCache) };
  };
}
