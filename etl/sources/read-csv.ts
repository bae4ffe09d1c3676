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
 * Streams a CSV file through the profile's decoding: fs stream → sha256 + byte count → (iconv-lite for
 * Windows-1252) → csv-parse. Yields records in batches, one per block of the file, so the caller pays for
 * one await per block rather than per row: the header comes first (line 1), then every record; rows the
 * parser cannot read come back with `error` so the caller can reject them instead of losing them. Memory
 * stays flat in the file size. `line` is the record's last line in the file; blank lines are skipped and
 * not counted.
 */
export async function* readCsv(
  path: string,
  profile: Profile,
  hash: Hash = createHash("sha256"),
  onBytes?: (n: number) => void,
): AsyncGenerator<CsvRecord[]> {
  let bytes = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      hash.update(chunk);
      bytes += chunk.length;
      onBytes?.(bytes);
      cb(null, chunk);
    },
  });
  // Line numbers are counted here (csv-parse's per-record info costs more than the parse): one per record
  // plus the line breaks inside quoted fields. A row the parser skips remembers how many records came
  // before it, so it is put back in file order and its lines are counted in the right place.
  let line = 0;
  let recordsRead = 0;
  const skipped: { after: number; lines: number; fields: string[]; error: string }[] = [];
  const parser = parse({
    delimiter: profile.delimiter,
    // UTF-8 goes to csv-parse as bytes (it decodes fields itself and drops a byte-order mark)
    bom: true,
    relax_column_count: true,
    skip_empty_lines: true,
    skip_records_with_error: true,
    on_skip: (err, raw) => {
      skipped.push({
        after: (parser as unknown as { info: { records: number } }).info.records,
        lines: 1 + (raw?.match(/\n/g)?.length ?? 0),
        fields: raw ? [raw.replace(/\r?\n$/, "")] : [],
        error: err?.message ?? "unreadable row",
      });
      return undefined;
    },
  });
  // 64 KB reads: parsing one takes a few milliseconds, so the event loop (database replies, the COPY of
  // the block before) never waits long for the reader
  const source = createReadStream(path, { highWaterMark: 1 << 16 });
  source.on("error", (e) => parser.destroy(new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${e.message}`)));
  const decoded = profile.encoding === "windows-1252" ? source.pipe(tap).pipe(iconv.decodeStream(ICONV[profile.encoding])) : source.pipe(tap);
  decoded.pipe(parser);
  let ended = false;
  let failure: Error | null = null;
  let wake: (() => void) | null = null;
  const notify = () => {
    const w = wake;
    wake = null;
    w?.();
  };
  parser.on("readable", notify);
  parser.on("end", () => {
    ended = true;
    notify();
  });
  parser.on("error", (e) => {
    failure = e;
    notify();
  });
  const takeSkipped = (batch: CsvRecord[], upTo: number) => {
    while (skipped.length && skipped[0].after <= upTo) {
      const k = skipped.shift()!;
      line += k.lines;
      batch.push({ line, fields: k.fields, error: k.error });
    }
  };
  for (;;) {
    const batch: CsvRecord[] = [];
    let fields: string[] | null;
    while ((fields = parser.read() as string[] | null) !== null) {
      takeSkipped(batch, recordsRead);
      recordsRead++;
      line += 1;
      for (const f of fields) if (f.includes("\n")) line += f.split("\n").length - 1;
      batch.push({ line, fields });
    }
    if (ended) takeSkipped(batch, Infinity);
    if (batch.length) {
      yield batch;
      continue;
    }
    if (failure) throw failure;
    if (ended) return;
    await new Promise<void>((resolve) => (wake = resolve));
  }
}
