import { createHash, type Hash } from "node:crypto";
import { isUtf8 } from "node:buffer";
import { createReadStream, openSync, readSync, closeSync, statSync } from "node:fs";
import { Transform } from "node:stream";
import { parse } from "csv-parse";
import { parse as parseSync } from "csv-parse/sync";
import iconv from "iconv-lite";
import { EtlFatalError } from "../errors.js";
import type { Profile } from "../profiles/profile-schema.js";

/**
 * How many bytes the parser may read without finishing a record. A quote left open runs the rest of the file
 * into one record, held in memory; past this the file is refused whole (nothing of it is loaded) rather than
 * read on. Real rows are a few hundred bytes. An object, so that a test can lower it.
 */
export const readLimits = { pendingBytes: 64 << 20 };

/** iconv-lite's name for each profile encoding; its UTF-8 decoder strips a byte-order mark. */
const ICONV: Record<Profile["encoding"], string> = { utf8: "utf8", "utf8-bom": "utf8", "windows-1252": "win1252" };

export interface CsvRecord {
  /** line number in the file of the record's last line (the header is line 1) */
  line: number;
  fields: string[];
  /** set when the parser could not read the row at all (e.g. an unclosed quote) */
  error?: string;
  /** set when the row's quoting ran several lines together: the lines, and why (see splitMergedLines) */
  merged?: { first: number; last: number; reason: string };
  /** set when the row holds a character no export means: a control byte, or one its encoding could not decode */
  suspect?: true;
}

/** NUL and the other control bytes (tab and line breaks aside), and U+FFFD, which decoding puts where bytes were not valid. */
export const SUSPECT_CHARACTER = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f\ufffd]/;

/** The parser's complaint about a record, in words. */
function parseProblem(err: { code?: string; message?: string } | undefined): string {
  if (err?.code === "CSV_QUOTE_NOT_CLOSED") return "a quote opened in this row is never closed before the end of the file";
  return err?.message ?? "unreadable row";
}

/** Line breaks in a piece of text: CRLF, LF or a lone CR each count once. */
export function lineBreaks(text: string): number {
  if (text.indexOf("\r") < 0) {
    let n = 0;
    for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", i + 1)) n++;
    return n;
  }
  return text.match(/\r\n|\n|\r/g)?.length ?? 0;
}

const PHYSICAL_LINE = /\r\n|\n|\r/;
const ENDS_WITH_BREAK = /[\r\n]$/;

/** How many lines of the file a record's raw text covers (its own line break included; the file's last line may have none). */
export function lineSpan(raw: string): number {
  if (raw === "") return 1;
  return lineBreaks(raw) + (ENDS_WITH_BREAK.test(raw) ? 0 : 1);
}

/** One physical line parsed on its own (quotes inside unquoted fields kept as text); null when its quoting is broken. */
function parseLine(text: string, delimiter: string): string[] | null {
  try {
    const rows = parseSync(text, { delimiter, relax_quotes: true, relax_column_count: true, record_delimiter: ["\r\n", "\n", "\r"] }) as string[][];
    return rows.length === 1 ? rows[0] : rows.length === 0 ? [""] : null;
  } catch {
    return null;
  }
}

/**
 * A record the parser read across several lines, checked for lines that ran together. A quoted field may
 * hold line breaks (a complaint written on two lines); but when a line after the first one is, on its own,
 * a whole row (as many fields as the header), a quote was left open and the rows after it were swallowed.
 * Then each line is read on its own: lines that make a whole row come back as rows of their own, the
 * others as unreadable rows that say which lines ran together. A record over several lines with the wrong
 * number of fields is split the same way (it cannot be a row as it is). Returns null when the record is
 * genuine. `force` splits whatever the lines look like (the parser already failed on the record).
 */
export function splitMergedLines(raw: string, lastLine: number, width: number, delimiter: string, force: boolean): CsvRecord[] | null {
  // (a record whose line breaks sit in a column that never holds one is forced by the caller)
  const lines = raw.replace(/(\r\n|\n|\r)$/, "").split(PHYSICAL_LINE);
  if (lines.length < 2 && !force) return null;
  const parsed = lines.map((l) => parseLine(l, delimiter));
  if (!force && !parsed.some((p, i) => i > 0 && p !== null && p.length >= width)) return null;
  const first = lastLine - lines.length + 1;
  const span = lines.length > 1 ? `lines ${first}–${lastLine}` : `line ${first}`;
  const merged = { first, last: lastLine, reason: "" };
  return lines.map((text, i): CsvRecord => {
    const line = first + i;
    const fields = parsed[i];
    if (fields !== null && fields.length === width) {
      const rec: CsvRecord = { line, fields, merged: { ...merged, reason: `a quote left open ran ${span} together; this line was read on its own` } };
      if (SUSPECT_CHARACTER.test(text)) rec.suspect = true;
      return rec;
    }
    const why = fields === null ? "a quote on this line is never closed" : `read on its own, the line has ${fields.length} fields but the header has ${width}`;
    return {
      line,
      fields: [text],
      error: `${why}; its quoting ran ${span} together, so each line was read on its own`,
      merged: { ...merged, reason: why },
    };
  });
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

/** Bytes ≥ 0x80 in a file's head: how many form valid UTF-8 sequences, how many do not. */
export function highByteCounts(head: Buffer): { utf8: number; other: number } {
  let utf8 = 0;
  let other = 0;
  for (let i = 0; i < head.length; i++) {
    const b = head[i];
    if (b < 0x80) continue;
    const len = b >= 0xc2 && b <= 0xdf ? 2 : b >= 0xe0 && b <= 0xef ? 3 : b >= 0xf0 && b <= 0xf4 ? 4 : 0;
    if (len > 0 && i + len <= head.length && isUtf8(head.subarray(i, i + len))) {
      utf8++;
      i += len - 1;
    } else if (len > 0 && i + len > head.length) {
      break; // a character cut off by the end of the head
    } else {
      other++;
    }
  }
  return { utf8, other };
}

/**
 * The encoding to read a file in, from its first bytes: the profile's, unless the bytes say otherwise. A file
 * a profile calls UTF-8 whose head has bytes above 0x7F but not one valid UTF-8 sequence was saved as
 * Windows-1252 (every byte is a character there); a file a profile calls Windows-1252 whose high bytes all
 * form valid UTF-8 sequences was saved as UTF-8 (Windows-1252 text almost never forms them). Bytes that do
 * not decode in the encoding chosen are rejected row by row.
 */
export function sniffEncoding(head: Buffer, declared: Profile["encoding"]): { encoding: Profile["encoding"]; note: string | null } {
  const { utf8, other } = highByteCounts(head);
  if (declared === "windows-1252") {
    return utf8 > 0 && other === 0
      ? { encoding: "utf8", note: "the profile says Windows-1252 but the file is UTF-8; it was read as UTF-8" }
      : { encoding: declared, note: null };
  }
  // a UTF-8 file with a few stray bytes stays UTF-8 (the rows holding them are rejected)
  return other > 0 && utf8 === 0
    ? { encoding: "windows-1252", note: "the profile says UTF-8 but the file's first lines are Windows-1252 text; it was read as Windows-1252" }
    : { encoding: declared, note: null };
}

/** The header cells of a file as a profile would read them (its delimiter, and the encoding its bytes show). */
export function headerCells(head: Buffer, profile: Profile): string[] {
  const text = iconv.decode(head, ICONV[sniffEncoding(head, profile.encoding).encoding]);
  // the first line that is not blank, whatever ends it (CRLF, LF or a lone CR)
  const firstLine = text.split(PHYSICAL_LINE).find((l) => l.trim() !== "") ?? "";
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
 * stays flat in the file size. `line` is the record's last line in the file, counted from the record's raw
 * text (CRLF, LF and a lone CR all end a line, mixed in one file too); blank lines are counted but yield
 * nothing. Lines that an open quote ran together are split again (splitMergedLines), each with its own line.
 */
export async function* readCsv(
  path: string,
  profile: Profile,
  hash: Hash = createHash("sha256"),
  onBytes?: (n: number) => void,
  /** the columns (by index) that may hold a line break, from the header; a break anywhere else means lines ran together */
  freeText?: (header: string[]) => ReadonlySet<number>,
): AsyncGenerator<CsvRecord[]> {
  let textColumns: ReadonlySet<number> | null = null;
  /** whether a record over several lines keeps its line breaks in free-text columns only */
  const breaksInText = (fields: string[]) => {
    if (!textColumns) return true;
    for (let i = 0; i < fields.length; i++) if (!textColumns.has(i) && /[\r\n]/.test(fields[i])) return false;
    return true;
  };
  let bytes = 0;
  // bytes read when the parser last finished a record (or gave one up)
  let records = -1;
  let bytesAtRecord = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      hash.update(chunk);
      bytes += chunk.length;
      onBytes?.(bytes);
      const done = (parser as unknown as { info: { records: number } }).info.records + skippedCount;
      if (done !== records) {
        records = done;
        bytesAtRecord = bytes;
      } else if (bytes - bytesAtRecord > readLimits.pendingBytes) {
        cb(
          new EtlFatalError(
            "UNBALANCED_QUOTE",
            `after line ${line}, ${Math.round((bytes - bytesAtRecord) / 1048576)} MB of the file run together as one row: a quote opened there is never closed. Nothing was loaded; fix the quote and load the file again`,
          ),
        );
        return;
      }
      cb(null, chunk);
    },
  });
  // Line numbers come from each record's raw text (csv-parse's per-record info costs more than the parse).
  // A row the parser skips remembers how many records came before it, so it is put back in file order.
  let line = 0;
  let recordsRead = 0;
  let width = -1;
  const skipped: { after: number; raw: string; error: string }[] = [];
  let skippedCount = 0;
  const parser = parse({
    delimiter: profile.delimiter,
    // UTF-8 goes to csv-parse as bytes (it decodes fields itself and drops a byte-order mark)
    bom: true,
    raw: true,
    // old Mac (CR), Unix (LF) and Windows (CRLF) endings, even mixed in one file
    record_delimiter: ["\r\n", "\n", "\r"],
    // a quote inside an unquoted field is text (12" hose); a field that opens with one and never closes it
    // is caught by splitMergedLines
    relax_quotes: true,
    relax_column_count: true,
    skip_records_with_error: true,
    on_skip: (err, raw) => {
      skippedCount++;
      skipped.push({
        after: (parser as unknown as { info: { records: number } }).info.records,
        raw: raw ?? "",
        error: parseProblem(err),
      });
      return undefined;
    },
  });
  // 64 KB reads: parsing one takes a few milliseconds, so the event loop (database replies, the COPY of
  // the block before) never waits long for the reader
  const source = createReadStream(path, { highWaterMark: 1 << 16 });
  source.on("error", (e) => parser.destroy(new EtlFatalError("FILE_UNREADABLE", `cannot read ${path}: ${e.message}`)));
  tap.on("error", (e) => parser.destroy(e));
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
      line += lineSpan(k.raw);
      const split = width > 0 ? splitMergedLines(k.raw, line, width, profile.delimiter, true) : null;
      if (split && split.length > 1) batch.push(...split);
      else batch.push({ line, fields: k.raw ? [k.raw.replace(/(\r\n|\n|\r)$/, "").slice(0, 2000)] : [], error: k.error });
    }
  };
  for (;;) {
    const batch: CsvRecord[] = [];
    let rec: { record: string[]; raw: string } | null;
    while ((rec = parser.read() as { record: string[]; raw: string } | null) !== null) {
      takeSkipped(batch, recordsRead);
      recordsRead++;
      const { record: fields, raw } = rec;
      // a record ends with its line break (the last one of the file may not)
      const span = lineSpan(raw);
      line += span;
      // a blank line: counted, never a row
      if (fields.length === 1 && fields[0].trim() === "") continue;
      if (width < 0) {
        width = fields.length;
        textColumns = freeText?.(fields) ?? null;
      } else if (span > 1) {
        const split = splitMergedLines(raw, line, width, profile.delimiter, fields.length !== width || !breaksInText(fields));
        if (split) {
          batch.push(...split);
          continue;
        }
      }
      if (SUSPECT_CHARACTER.test(raw)) batch.push({ line, fields, suspect: true });
      else batch.push({ line, fields });
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
