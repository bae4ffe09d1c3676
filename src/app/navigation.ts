import { allRoles, benchSheetWriteRoles, claimRoles, importRoles, lifeRoles, rateRoles, type Role } from "@shared/roles";
import { pagePaths } from "./page-paths";
import { winterReadinessRoles } from "@shared/schemas/fitting-list";

export type PageKey = keyof typeof pagePaths;

export interface PageAccess {
  /** the roles the page serves; the router refuses it to anyone else, and the API the same (shared/roles.ts) */
  roles: readonly Role[];
  /** what the page is, as it reads in "<title> is for …" */
  title: string;
  /** its entry in the main menu, in menu order; pages reached from another page have none */
  menu?: string;
}

const ALL: readonly Role[] = ["admin", "analyst", "director", "manager", "clerk"];
const BENCHMARKS: readonly Role[] = ["director", "analyst", "manager", "admin"];
const ADMIN: readonly Role[] = ["admin"];

/**
 * Which roles each page serves: one table for the menu and the router. A page opened by a role outside it is
 * refused by the page (it names the pages the role can use) as well as by the API. Keys in menu order.
 */
export const pageAccess: Record<PageKey, PageAccess> = {
  overview: { roles: ALL, title: "The overview", menu: "Overview" },
  // the clerk reads the findings on the overview, whose links open the clusters: they are the clerk's pages too
  clusters: { roles: ALL, title: "The failure clusters", menu: "Clusters" },
  cluster: { roles: ALL, title: "A failure cluster" },
  rates: { roles: rateRoles, title: "The failure rates", menu: "Rates" },
  life: { roles: lifeRoles, title: "The life curves (Weibull, Kaplan–Meier, repeat repairs)", menu: "Life" },
  repairs: { roles: ALL, title: "The repair records", menu: "Repairs" },
  repair: { roles: ALL, title: "A repair record" },
  // the technician's only menu page, so their home (homeFor)
  benchSheet: { roles: benchSheetWriteRoles, title: "The bench sheet", menu: "Bench sheet" },
  benchmarks: { roles: BENCHMARKS, title: "The shop benchmarks", menu: "Benchmarks" },
  winter: { roles: winterReadinessRoles, title: "Winter readiness", menu: "Winter readiness" },
  adminUsers: { roles: ADMIN, title: "User administration", menu: "Users" },
  adminShops: { roles: ADMIN, title: "Shop administration", menu: "Shops" },
  adminProfiles: { roles: ADMIN, title: "Export profiles", menu: "Profiles" },
  adminProfile: { roles: ADMIN, title: "An export profile" },
  adminWarrantyPolicies: { roles: ADMIN, title: "Warranty policies", menu: "Warranty policies" },
  adminWarrantyPolicy: { roles: ADMIN, title: "A warranty policy" },
  adminEngineSpecs: { roles: ADMIN, title: "Engine figures", menu: "Engine figures" },
  claims: { roles: claimRoles, title: "Warranty claims", menu: "Claims" },
  claimNew: { roles: claimRoles, title: "A new warranty claim" },
  claim: { roles: claimRoles, title: "A warranty claim" },
  imports: { roles: importRoles, title: "The imports and load history", menu: "Imports" },
  batchRejects: { roles: importRoles, title: "A load's rejected rows" },
  adminMail: { roles: ADMIN, title: "Captured mail", menu: "Captured mail" },
  adminSettings: { roles: ADMIN, title: "Group settings", menu: "Settings" },
  // reached from the user menu in the header, not the main menu
  account: { roles: allRoles, title: "Your account" },
};

export interface NavItem {
  to: string;
  label: string;
  roles: readonly Role[];
}

/** Navigation shaped by role: a role sees only the pages it may use (the server enforces the same). */
export const navItems: readonly NavItem[] = (Object.entries(pageAccess) as [PageKey, PageAccess][])
  .filter(([, p]) => p.menu !== undefined)
  .map(([key, p]) => ({ to: pagePaths[key], label: p.menu!, roles: p.roles }));

export const mayOpen = (page: PageKey, roles: readonly Role[]): boolean => pageAccess[page].roles.some((r) => roles.includes(r));

export function navFor(roles: readonly Role[]): NavItem[] {
  return navItems.filter((n) => n.roles.some((r) => roles.includes(r)));
}

/** Where a role starts: its first menu page. */
export const homeFor = (roles: readonly Role[]): NavItem => navFor(roles)[0] ?? navItems[0]!;
