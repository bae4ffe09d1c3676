import { roleLabels, type Role } from "../../shared/roles.js";

export interface Access {
  roles: readonly Role[];
  shops: readonly string[];
}

const list = (items: readonly string[]) =>
  items.length === 0 ? "none" : items.length === 1 ? items[0] : `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;
const rolesIn = (roles: readonly Role[]) => list(roles.map((r) => roleLabels[r]));
const shopsIn = (shops: readonly string[]) => list(shops);
const same = (a: readonly string[], b: readonly string[]) => a.length === b.length && [...a].sort().every((x, i) => x === [...b].sort()[i]);

/** Whether two accesses grant the same roles and shops, in any order. */
export const sameAccess = (a: Access, b: Access) => same(a.roles, b.roles) && same(a.shops, b.shops);

/** "Odile Varrow changed Jarek Fenn's shops from S1 to S1 and S5 in Ironledger; …" — an admin's save, in a sentence. */
export function accessSetSentence(actor: string, user: string, before: Access, after: Access, wasProvider: boolean): string {
  const changes: string[] = [];
  if (!same(before.roles, after.roles)) changes.push(`roles from ${rolesIn(before.roles)} to ${rolesIn(after.roles)}`);
  if (!same(before.shops, after.shops)) changes.push(`shops from ${shopsIn(before.shops)} to ${shopsIn(after.shops)}`);
  const what = changes.length
    ? `changed ${user}'s ${changes.join(" and ")} in Ironledger`
    : `kept ${user}'s roles (${rolesIn(after.roles)}) and shops (${shopsIn(after.shops)}) as they were, now set in Ironledger`;
  return `${actor} ${what}${wasProvider ? "; from now on these replace the identity provider's roles and shops for them" : ""}.`;
}

export function providerAgainSentence(actor: string, user: string, before: Access, provider: Access): string {
  return `${actor} returned ${user} to the identity provider's roles and shops (${rolesIn(provider.roles)}; shops ${shopsIn(provider.shops)} at their last sign-in), in place of those set in Ironledger (${rolesIn(before.roles)}; shops ${shopsIn(before.shops)}).`;
}

export function deactivatedSentence(actor: string, user: string, sessions: number): string {
  const ended = sessions === 0 ? "no session was open" : sessions === 1 ? "their one open session ended" : `their ${sessions} open sessions ended`;
  return `${actor} deactivated ${user}: ${ended}, and their sign-ins are refused.`;
}

export function reactivatedSentence(actor: string, user: string): string {
  return `${actor} reactivated ${user}: they may sign in again.`;
}
