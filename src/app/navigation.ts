import { importRoles, type Role } from "@shared/roles";

export interface NavItem {
  to: string;
  label: string;
  roles: readonly Role[];
}

/** Navigation shaped by role: a role sees only the pages it may use (the server enforces the same). */
export const navItems: readonly NavItem[] = [
  { to: "/", label: "Overview", roles: ["admin", "analyst", "director", "manager", "clerk"] },
  { to: "/clusters", label: "Clusters", roles: ["analyst", "director", "manager", "admin"] },
  { to: "/rates", label: "Rates", roles: ["analyst", "director", "manager", "admin"] },
  { to: "/life", label: "Life", roles: ["analyst", "director", "admin"] },
  { to: "/repairs", label: "Repairs", roles: ["analyst", "director", "manager", "clerk", "admin"] },
  { to: "/benchmarks", label: "Benchmarks", roles: ["director", "analyst", "manager", "admin"] },
  { to: "/admin/users", label: "Users", roles: ["admin"] },
  { to: "/admin/shops", label: "Shops", roles: ["admin"] },
  { to: "/admin/profiles", label: "Profiles", roles: ["admin"] },
  { to: "/admin/warranty-policies", label: "Warranty policies", roles: ["admin"] },
  { to: "/claims", label: "Claims", roles: ["clerk", "manager"] },
  { to: "/imports", label: "Imports", roles: importRoles },
  { to: "/admin/mail", label: "Captured mail", roles: ["admin"] },
];

export function navFor(roles: readonly Role[]): NavItem[] {
  return navItems.filter((n) => n.roles.some((r) => roles.includes(r)));
}
