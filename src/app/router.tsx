import { createBrowserRouter, redirect, type RouteObject } from "react-router-dom";
import type { QueryClient } from "@tanstack/react-query";
import { Layout } from "./layout";
import { lazyPage } from "./page-loader";
import { pagePaths } from "./page-paths";
import { homeFor, mayOpen } from "./navigation";
import { RouteError } from "@/routes/route-error";
import { AreaError, type AreaWords } from "@/routes/area-error";
import { SignedOutRoute } from "@/routes/sign-in";
import { meQueries } from "@/features/session/api/me-queries";

/** A route area: a pathless route whose error boundary explains refusals in the area's own words. */
const area = (words: AreaWords, children: RouteObject[]): RouteObject => ({ errorElement: <AreaError {...words} />, children });

export function routes(qc: QueryClient): RouteObject[] {
  return [
    { path: "/signed-out", element: <SignedOutRoute />, errorElement: <RouteError /> },
    {
      path: pagePaths.overview,
      element: <Layout />,
      errorElement: <RouteError />,
      loader: async ({ request }) => {
        const me = await qc.ensureQueryData(meQueries.current());
        // a role without the overview (the technician) starts on its own home page
        if (me && new URL(request.url).pathname === pagePaths.overview && !mayOpen("overview", me.roles)) return redirect(homeFor(me.roles).to);
        return null;
      },
      shouldRevalidate: ({ currentUrl, nextUrl, defaultShouldRevalidate }) => defaultShouldRevalidate || (nextUrl.pathname === pagePaths.overview && currentUrl.pathname !== nextUrl.pathname),
      children: [
        area({ subject: "the failure analytics", list: { to: pagePaths.clusters, label: "All clusters" } }, [
          { index: true, lazy: lazyPage(qc, "overview", () => import("@/routes/overview")) },
          { path: pagePaths.clusters, lazy: lazyPage(qc, "clusters", () => import("@/routes/clusters")) },
          { path: pagePaths.cluster, lazy: lazyPage(qc, "cluster", () => import("@/routes/cluster-detail")) },
          { path: pagePaths.rates, lazy: lazyPage(qc, "rates", () => import("@/routes/rates")) },
          { path: pagePaths.life, lazy: lazyPage(qc, "life", () => import("@/routes/life")) },
        ]),
        area({ subject: "the repair records", list: { to: pagePaths.repairs, label: "All repairs" } }, [
          { path: pagePaths.repairs, lazy: lazyPage(qc, "repairs", () => import("@/routes/repairs")) },
          { path: pagePaths.repair, lazy: lazyPage(qc, "repair", () => import("@/routes/repair-detail")) },
        ]),
        area({ subject: "the bench sheet" }, [
          { path: pagePaths.benchSheet, lazy: lazyPage(qc, "benchSheet", () => import("@/routes/bench-sheet")) },
        ]),
        area({ subject: "the shop benchmarks" }, [
          { path: pagePaths.benchmarks, lazy: lazyPage(qc, "benchmarks", () => import("@/routes/benchmarks")) },
        ]),
        area({ subject: "winter readiness" }, [{ path: pagePaths.winter, lazy: lazyPage(qc, "winter", () => import("@/routes/winter")) }]),
        area({ subject: "warranty claims", list: { to: pagePaths.claims, label: "All claims" } }, [
          { path: pagePaths.claims, lazy: lazyPage(qc, "claims", () => import("@/routes/claims")) },
          { path: pagePaths.claimNew, lazy: lazyPage(qc, "claimNew", () => import("@/routes/claim-new")) },
          { path: pagePaths.claim, lazy: lazyPage(qc, "claim", () => import("@/routes/claim-detail")) },
        ]),
        area({ subject: "the imports and load history", list: { to: pagePaths.imports, label: "Imports" } }, [
          { path: pagePaths.imports, lazy: lazyPage(qc, "imports", () => import("@/routes/imports")) },
          { path: pagePaths.batchRejects, lazy: lazyPage(qc, "batchRejects", () => import("@/routes/batch-rejects")) },
        ]),
        area({ subject: "the administration pages" }, [
          { path: pagePaths.adminUsers, lazy: lazyPage(qc, "adminUsers", () => import("@/routes/admin-users")) },
          { path: pagePaths.adminShops, lazy: lazyPage(qc, "adminShops", () => import("@/routes/admin-shops")) },
          { path: pagePaths.adminProfiles, lazy: lazyPage(qc, "adminProfiles", () => import("@/routes/admin-profiles")) },
          { path: pagePaths.adminProfile, lazy: lazyPage(qc, "adminProfile", () => import("@/routes/admin-profile")) },
          { path: pagePaths.adminMail, lazy: lazyPage(qc, "adminMail", () => import("@/routes/admin-mail")) },
          { path: pagePaths.adminSettings, lazy: lazyPage(qc, "adminSettings", () => import("@/routes/admin-settings")) },
          { path: pagePaths.adminWarrantyPolicies, lazy: lazyPage(qc, "adminWarrantyPolicies", () => import("@/routes/admin-warranty-policies")) },
          { path: pagePaths.adminWarrantyPolicy, lazy: lazyPage(qc, "adminWarrantyPolicy", () => import("@/routes/admin-warranty-policy")) },
          { path: pagePaths.adminEngineSpecs, lazy: lazyPage(qc, "adminEngineSpecs", () => import("@/routes/admin-engine-specs")) },
        ]),
        area({ subject: "your account" }, [
          { path: pagePaths.account, lazy: lazyPage(qc, "account", () => import("@/routes/account")) },
        ]),
        { path: "*", lazy: () => import("@/routes/not-found") },
      ],
    },
  ];
}

export const createRouter = (qc: QueryClient) => createBrowserRouter(routes(qc));
