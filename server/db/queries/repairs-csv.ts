/**
 * The repairs CSV, written by PostgreSQL: COPY (the list's query with every cell already as the CSV holds it,
 * repairCsvSelect) TO STDOUT (FORMAT csv, HEADER true), streamed through pg-copy-streams from a pool client
 * of its own. The bytes are those csv-stringify writes from the same rows with the cell rule of
 * shared/csv-cell.ts and \r\n record ends (tests/api/repairs-csv-copy.test.ts compares them). COPY ends a
 * record with \n, so the \n that ends a record (one outside quotes) gets its \r here. Like csv-stringify with
 * its default quoting, COPY quotes a cell that holds a lone \n or \r; the options the CSV was written with
 * before (record_delimiter "windows" alone) left such a cell bare, which split its row for most readers.
 */
import { Transform, pipeline, type Readable, type TransformCallback } from "node:stream";
import type { CompiledQuery } from "kysely";
import pg from "pg";
import * as copyStreams from "pg-copy-streams";
import type { Db } from "../database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { RepairListQuery } from "../../../shared/schemas/repairs.js";
import { repairCsvSelect, type RepairFilter } from "./repairs.js";

const QUOTE = 0x22;
const LF = 0x0a;
const CR = 0x0d;

/**
 * Turns the record ends of a CSV stream from \n into \r\n and leaves a \n inside a quoted cell alone. A cell's
 * quotes, its "" escapes included, come in pairs, so a \n ends a record when the quotes before it in the
 * stream are even in number; that count is carried from one chunk to the next.
 */
export class CrlfRecordEnds extends Transform {
  #quoted = false;

  override _transform(chunk: Buffer, _encoding: BufferEncoding, done: TransformCallback): void {
    const n = chunk.length;
    const next = (byte: number, from: number) => {
      const at = chunk.indexOf(byte, from);
      return at < 0 ? n : at;
    };
    const ends: number[] = [];
    let quoted = this.#quoted;
    let quote = next(QUOTE, 0);
    let lf = next(LF, 0);
    for (;;) {
      if (quoted) {
        if (quote === n) break;
        quoted = false;
        if (lf < quote) lf = next(LF, quote + 1);
        quote = next(QUOTE, quote + 1);
      } else if (lf < quote) {
        ends.push(lf);
        lf = next(LF, lf + 1);
      } else if (quote < n) {
        quoted = true;
        quote = next(QUOTE, quote + 1);
      } else {
        break;
      }
    }
    this.#quoted = quoted;
    if (ends.length === 0) {
      done(null, chunk);
      return;
    }
    const out = Buffer.allocUnsafe(n + ends.length);
    let from = 0;
    let to = 0;
    for (const end of ends) {
      to += chunk.copy(out, to, from, end);
      out[to++] = CR;
      from = end;
    }
    chunk.copy(out, to, from, n);
    done(null, out);
  }
}

/**
 * The compiled query's text with each $n replaced by its value as a literal (pg's escapeLiteral, as libpq's
 * PQescapeLiteral writes it): COPY takes no bind parameters. The list's conditions pass only strings.
 */
export function inlineParameters(query: CompiledQuery): string {
  const used = new Set<number>();
  const text = query.sql.replace(/\$(\d+)/g, (_, digits: string) => {
    const i = Number(digits) - 1;
    const value = query.parameters[i];
    if (typeof value !== "string") throw new Error(`parameter $${digits} of the CSV query is a ${typeof value}, not a string`);
    used.add(i);
    return pg.escapeLiteral(value);
  });
  if (used.size !== query.parameters.length) throw new Error("the CSV query does not use each of its parameters");
  return text;
}

/**
 * Starts the CSV of every line the filter matches, in list order, and hands back its bytes as a stream, read
 * only as fast as the consumer takes them (pg-copy-streams stops reading the connection meanwhile, and the
 * server waits). The COPY is one statement, so one snapshot. The pool client is the COPY's alone. COMMIT is
 * queued behind the COPY, so the transaction ends as soon as the server has sent the last row, and the client
 * goes back to the pool then. If the stream is destroyed before that (the client of the download left) or
 * fails, the client is released with the error, which makes the pool close the connection; the server ends
 * the COPY when it finds the connection gone. Resolves once the header row has arrived.
 */
export async function openRepairCsv(
  db: Db,
  pool: pg.Pool,
  scope: ShopScope,
  r: RepairFilter,
  order: Pick<RepairListQuery, "sort" | "dir">,
): Promise<Readable> {
  const select = inlineParameters(repairCsvSelect(scope, r, order).compile(db));
  const client = await pool.connect();
  // a checked-out client has no listener of the pool's: its connection's failure must not go unhandled
  const connectionFailed = () => undefined;
  client.on("error", connectionFailed);
  let released = false;
  const release = (err?: Error) => {
    if (released) return;
    released = true;
    client.removeListener("error", connectionFailed);
    client.release(err);
  };
  let copy: copyStreams.CopyToStreamQuery;
  try {
    // JIT off: compiling the cell expressions cost more than it saved (seconds over a million lines)
    await client.query("BEGIN READ ONLY; SET LOCAL jit = off");
    copy = client.query(copyStreams.to(`COPY (${select}) TO STDOUT (FORMAT csv, HEADER true)`));
  } catch (err) {
    release(err as Error);
    throw err;
  }
  // after a failed COPY the server answers COMMIT with a rollback, and the connection is fit for reuse
  client.query("COMMIT").then(() => release(), (err: Error) => release(err));
  // the connection may still report its end to the COPY after the pipeline below has finished with an error
  copy.on("error", () => undefined);
  const csv = new CrlfRecordEnds();
  pipeline(copy, csv, (err) => {
    if (err) release(err);
  });
  // a COPY that cannot start (its query fails to plan) fails before the header row: throw, so the caller can
  // still answer with an error instead of a file that ends at once
  await new Promise<void>((resolve, reject) => {
    const settle = (err?: Error) => {
      csv.off("readable", settle).off("error", settle);
      if (err) reject(err);
      else resolve();
    };
    csv.on("readable", settle).on("error", settle);
  });
  return csv;
}
