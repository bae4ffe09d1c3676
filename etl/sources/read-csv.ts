import { createHash, type Hash } from "node:crypto";
import { createReadStream, openSync, readSync, closeSync, statSync } from "node:fs";
import { Transform } from "node:stream";
import { parse } from "csv-parse";
import { parse as parseSync } from "csv-parse/sync";
import iconv from "iconv-lite";
import { EtlFatalError } from "../errors.js";
import type { Profile } from "../profiles/profile-schema.js";

/** iconv-lite's name for each profile encoding; its UTF-8 decoder strips a byte-order mark. */
const ICONV: Record<Profile["encoding"], string> = { utf8: "utf8", "utf8-bom": "utf8", "windows-1252": "win1252" };

export interface CsvRecord {
  /** line number in the file (the header is line 1) */
  line: number;
  fields: string[];
  /** set when the parser could not read the row at all (e.g. an unclosed quote) */
  error?: string;
}

/** Size of a readable regular file; a fatal error otherwise. */
export function checkReadable(path: string): number {
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new Error("not a regular file");
    closeSync(openSync(path, "r"));
    return st.size;
  } catch (e) {
    throw new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${(e as Error).message}`);
  }
}

/** The file's first bytes, enough for its header line (read once for profile detection). */
export function readHead(path: string, bytes = 65536): Buffer {
  const fd = openSync(path, "r");
  try {
    const buf = Buffer.alloc(bytes);
    const n = readSync(fd, buf, 0, bytes, 0);
    return buf.subarray(0, n);
  } finally {
    closeSync(fd);
  }
}

/** The header cells of a file as a profile would read them (its encoding and delimiter). */
export function headerCells(head: Buffer, profile: Profile): string[] {
  const text = iconv.decode(head, ICONV[profile.encoding]);
  const firstLine = text.split(/\r?\n/, 1)[0] ?? "";
  try {
    const rows = parseSync(firstLine, { delimiter: profile.delimiter, relax_quotes: true, relax_column_count: true }) as string[][];
    return rows[0] ?? [];
  } catch {
    return [];
  }
}

/**
 * Streams a CSV file through the profile's decoding: fs stream → sha256 + byte count → iconv-lite → csv-parse.
 * Yields the header first (line 1), then every record; rows the parser cannot read come back with `error`
 * so the caller can reject them instead of losing them. Memory stays flat in the file size.
 * `line` is the record's last line in the file; blank lines are skipped and not counted.
 */
export async function* readCsv(
  path: string,
  profile: Profile,
  hash: Hash = createHash("sha256"),
  onBytes?: (n: number) => void,
): AsyncGenerator<CsvRecord> {
  let bytes = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      hash.update(chunk);
      bytes += chunk.length;
      onBytes?.(bytes);
      cb(null, chunk);
    },
  });
  const skipped: CsvRecord[] = [];
  let line = 0;
  const parser = parse({
    delimiter: profile.delimiter,
    relax_column_count: true,
    skip_empty_lines: true,
    skip_records_with_error: true,
    on_skip: (err, raw) => {
      line += 1 + (raw?.match(/\n/g)?.length ?? 0);
      skipped.push({ line, fields: raw ? [raw.replace(/\r?\n$/, "")] : [], error: err?.message ?? "unreadable row" });
      return undefined;
    },
  });
  const source = createReadStream(path, { highWaterMark: 1 << 20 });
  source.on("error", (e) => parser.destroy(new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${e.message}`)));
  source.pipe(tap).pipe(iconv.decodeStream(ICONV[profile.encoding])).pipe(parser);
  // line numbers are counted here (csv-parse's per-record info costs more than the parse): one per record,
  // plus the line breaks inside quoted fields
  for await (const record of parser as AsyncIterable<string[]>) {
    while (skipped.length) yield skipped.shift()!;
    line += 1;
    for (const f of record) if (f.includes("\n")) line += f.split("\n").length - 1;
    yield { line, fields: record };
  }
  while (skipped.length) yield skipped.shift()!;
}
