import type { Db } from "../../db/database.js";
import type { Format } from "../../../shared/format.js";
import type { Role } from "../../../shared/roles.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { DigestSection } from "../../../shared/schemas/digest.js";
import type { BenchmarkService } from "../benchmarks/service.js";

/** Who a digest is for: their effective roles and the shops they may see, as the pages read them. */
export interface DigestReader {
  sub: string;
  name: string;
  roles: readonly Role[];
  scope: ShopScope;
}

/** What a section reads its data with: the reader's own scope, never a wider one. */
export interface DigestContext {
  db: Db;
  benchmarks: BenchmarkService;
  reader: DigestReader;
  /** the day the digest is for, ISO date */
  date: string;
  /** changes after this instant are new to the reader */
  since: Date;
}

/** What a pure builder needs beside its data: the absolute link to a page path, and the formatter. */
export interface BuildTools {
  link: (path: string) => string;
  format: Format;
}

/**
 * One section of the weekly digest: who gets it, how its data is read (in the reader's scope), and a pure
 * builder from that data to a title, lines in words and links back to the pages.
 */
export interface SectionSource<D> {
  key: string;
  appliesTo(reader: DigestReader): boolean;
  load(ctx: DigestContext): Promise<D>;
  build(data: D, tools: BuildTools): DigestSection;
}

export const hasRole = (reader: Pick<DigestReader, "roles">, ...roles: Role[]): boolean => reader.roles.some((r) => roles.includes(r));

/** At most `max` lines, the rest said as a count. */
export function capped(lines: string[], max: number, what: string): string[] {
  if (lines.length <= max) return lines;
  return [...lines.slice(0, max), `… and ${lines.length - max} more ${what} on the page.`];
}
