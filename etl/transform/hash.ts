import { createHash } from "node:crypto";

/** Content hash of a normalised row: same natural key + same hash means nothing changed. */
export function rowHash(values: readonly unknown[]): string {
  return createHash("md5").update(JSON.stringify(values)).digest("hex");
}
