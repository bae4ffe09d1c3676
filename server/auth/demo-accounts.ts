import type { Role } from "../../shared/roles.js";

/** The local identity provider's accounts. Invented people; documented in README.md. */
export interface DemoAccount {
  username: string;
  password: string;
  name: string;
  email: string;
  roles: Role[];
  shops: string[];
}

export const DEMO_PASSWORD = "ledger-demo";

export const demoAccounts: readonly DemoAccount[] = [
  { username: "admin", name: "Odile Varrow", roles: ["admin"], shops: [] },
  { username: "analyst", name: "Teodor Quill", roles: ["analyst"], shops: [] },
  { username: "director", name: "Maren Holloway", roles: ["director"], shops: [] },
  { username: "manager.s1", name: "Jarek Fenn", roles: ["manager"], shops: ["S1"] },
  { username: "manager.s5", name: "Ysolde Brack", roles: ["manager"], shops: ["S5"] },
  { username: "clerk", name: "Pim Aldous", roles: ["clerk"], shops: [] },
  { username: "tech.s1s2", name: "Ansel Moorcroft", roles: ["technician"], shops: ["S1", "S2"] },
  { username: "tech.s3s4", name: "Brenna Thackett", roles: ["technician"], shops: ["S3", "S4"] },
  { username: "tech.s5s6", name: "Corvin Ashdale", roles: ["technician"], shops: ["S5", "S6"] },
  { username: "tech.s7s8", name: "Delphine Ravensby", roles: ["technician"], shops: ["S7", "S8"] },
].map((a) => ({ ...a, password: DEMO_PASSWORD, email: `${a.username}@ironledger.invalid`, roles: a.roles as Role[] }));

export function findDemoAccount(username: string): DemoAccount | undefined {
  return demoAccounts.find((a) => a.username === username.trim().toLowerCase());
}
