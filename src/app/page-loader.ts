import type { ComponentType } from "react";
import type { LoaderFunction, Params } from "react-router-dom";
import type { QueryClient } from "@tanstack/react-query";
import { meQueries } from "@/features/session/api/me-queries";
import type { Me } from "@shared/schemas/me";

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

/**
 * The route loader for a page. It waits for the session (the root loader asks for it at the same moment, so
 * this is one request) and primes nothing for a signed-out visitor: the layout asks them to sign in instead.
 */
function pageLoader(qc: QueryClient, primeCache: PrimeCache): LoaderFunction {
  return async ({ params, request }) => {
    const me = await qc.ensureQueryData(meQueries.current());
    if (me) await primeCache(qc, { params, url: new URL(request.url), me });
    return null;
  };
}

/** A route's `lazy`: loads the page module, then hands React Router its component and, if it has one, its loader. */
export function lazyPage(qc: QueryClient, load: () => Promise<PageModule>) {
  return async (): Promise<{ Component: ComponentType; loader?: LoaderFunction }> => {
    const { Component, primeCache } = await load();
    return primeCache ? { Component, loader: pageLoader(qc, primeCache) } : { Component };
  };
}
