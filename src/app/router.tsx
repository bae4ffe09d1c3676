import { createBrowserRouter, type RouteObject } from "react-router-dom";
import type { QueryClient } from "@tanstack/react-query";
import { Layout } from "./layout";
import { RouteError } from "@/routes/route-error";
import { SignedOutRoute } from "@/routes/sign-in";
import { meQueries } from "@/features/session/api/me-queries";

export function routes(qc: QueryClient): RouteObject[] {
  return [
    { path: "/signed-out", element: <SignedOutRoute />, errorElement: <RouteError /> },
    {
      path: "/",
      element: <Layout />,
      errorElement: <RouteError />,
      loader: async () => {
        await qc.ensureQueryData(meQueries.current());
        return null;
      },
      children: [
        { index: true, lazy: () => import("@/routes/overview") },
        { path: "clusters", lazy: () => import("@/routes/clusters") },
        { path: "clusters/:id", lazy: () => import("@/routes/cluster-detail") },
        { path: "rates", lazy: () => import("@/routes/rates") },
        { path: "life", lazy: () => import("@/routes/life") },
        { path: "repairs", lazy: () => import("@/routes/repairs") },
        { path: "repairs/:id", lazy: () => import("@/routes/repair-detail") },
        { path: "benchmarks", lazy: () => import("@/routes/benchmarks") },
        { path: "admin/users", lazy: () => import("@/routes/admin-users") },
        { path: "claims", lazy: () => import("@/routes/claims") },
        { path: "claims/new", lazy: () => import("@/routes/claim-new") },
        { path: "claims/:id", lazy: () => import("@/routes/claim-detail") },
        { path: "admin/mail", lazy: () => import("@/routes/admin-mail") },
        { path: "*", lazy: () => import("@/routes/not-found") },
      ],
    },
  ];
}

export const createRouter = (qc: QueryClient) => createBrowserRouter(routes(qc));
