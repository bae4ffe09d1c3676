import { z } from "zod";

export const roleSchema = z.enum(["admin", "analyst", "director", "manager", "clerk", "technician"]);
export type Role = z.infer<typeof roleSchema>;
export const allRoles = roleSchema.options;

export const roleLabels: Record<Role, string> = {
  admin: "Administrator",
  analyst: "Group analyst",
  director: "Service director",
  manager: "Shop manager",
  clerk: "Warranty clerk",
  technician: "Technician",
};

/** Roles whose shop scope is the whole group; a manager or a technician is limited to the shops named in their claim. */
export const groupWideRoles: readonly Role[] = ["admin", "analyst", "director", "clerk"];

/** Roles that build and file warranty claims. */
export const claimRoles = ["clerk", "manager"] as const satisfies readonly Role[];

/** Roles that feed exports from the browser and read the load history: a manager for their shops, the others group-wide. */
export const importRoles = ["admin", "analyst", "manager"] as const satisfies readonly Role[];

/** Roles that read the analytics (overview, repairs, rates, life curves, clusters). */
/** Findings' states are read by the group-wide roles (their words may name any shop), worked by those who decide on them. */
export const findingReadRoles = ["analyst", "director", "clerk", "admin"] as const satisfies readonly Role[];
export const findingWorkRoles = ["analyst", "director", "admin"] as const satisfies readonly Role[];

export const analyticsRoles = ["analyst", "director", "manager", "clerk", "admin"] as const satisfies readonly Role[];

/** Roles that read the life curves (Weibull, Kaplan–Meier, MCF): the group-wide analysis roles, not a shop manager or clerk. */
export const lifeRoles = ["analyst", "director", "admin"] as const satisfies readonly Role[];

/** Roles that read the failure rates (the rates page, and the life page that shares its filters): not the clerk, whose menu has neither. */
export const rateRoles = ["analyst", "director", "manager", "admin"] as const satisfies readonly Role[];

/**
 * Roles that fill in the bench sheet at the machine (search open lines, add a line, save readings): a technician
 * or a manager, for their shops. The group-wide analysis roles may read what was entered.
 */
export const benchSheetWriteRoles = ["technician", "manager"] as const satisfies readonly Role[];
export const benchSheetReadRoles = ["technician", "manager", "analyst", "admin"] as const satisfies readonly Role[];
