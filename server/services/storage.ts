import { createReadStream } from "node:fs";
import { Readable } from "node:stream";
import { buffer } from "node:stream/consumers";
import { S3Client, HeadBucketCommand, CreateBucketCommand, DeleteObjectCommand, GetObjectCommand, PutObjectCommand } from "@aws-sdk/client-s3";
import { HttpError, storageUnavailable } from "../errors.js";
import { logger } from "../logger.js";

/**
 * Object storage through the AWS SDK, the one module that talks to it; locally the same client talks to the
 * s3rver fake on loopback. Callers see keys, bytes and streams, never the SDK: a store that does not answer
 * becomes 503 storage_unavailable here, in words, so no other layer mistakes it for the database or mail.
 */

export interface StorageSettings {
  endpoint: string | null;
  region: string;
  bucket: string;
  accessKeyId: string | null;
  secretAccessKey: string | null;
}

/** An object being read: its bytes as a stream, and its length when the store tells it. */
export interface StoredObject {
  body: Readable;
  contentLength: number | undefined;
}

/** A reachability answer is reused this long, so a busy claim page or health check does not probe per request. */
const PROBE_TTL_MS = 2000;
const PROBE_TIMEOUT_MS = 2000;

const SOCKET_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "ENOTFOUND", "EAI_AGAIN", "EHOSTUNREACH", "ENETUNREACH", "ECONNABORTED"]);

/** True when the store could not be reached or failed on its side (a socket error, a timeout, a 5xx). */
function isUnreachable(err: unknown): boolean {
  const e = err as { code?: string; name?: string; message?: string; errors?: unknown[]; $metadata?: { httpStatusCode?: number } };
  if (!e || typeof e !== "object") return false;
  if (e.code && SOCKET_CODES.has(e.code)) return true;
  if (e.name === "TimeoutError" || e.name === "AbortError" || e.name === "RequestTimeout") return true;
  if (typeof e.message === "string" && /socket hang up/i.test(e.message)) return true;
  if ((e.$metadata?.httpStatusCode ?? 0) >= 500) return true;
  return Array.isArray(e.errors) && e.errors.length > 0 && e.errors.every(isUnreachable);
}

export function createStorage(s: StorageSettings) {
  const client = new S3Client({
    region: s.region,
    ...(s.endpoint ? { endpoint: s.endpoint, forcePathStyle: true } : {}),
    ...(s.accessKeyId && s.secretAccessKey
      ? { credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } }
      : {}),
    // a store that accepts no connection is known in seconds rather than at the operating system's timeout
    requestHandler: { connectionTimeout: 3000 },
  });

  let known: { ok: boolean; at: number } | null = null;
  let probing: Promise<boolean> | null = null;
  const note = (ok: boolean) => {
    known = { ok, at: Date.now() };
  };

  /** Sends one command; an unreachable store becomes storage_unavailable (with what could not be done). */
  async function send<T>(run: () => Promise<T>, consequence: string): Promise<T> {
    try {
      const out = await run();
      note(true);
      return out;
    } catch (err) {
      if (!isUnreachable(err)) throw err;
      note(false);
      logger.warn({ err: { name: (err as Error).name, code: (err as { code?: string }).code, message: (err as Error).message } }, "object storage unreachable");
      throw storageUnavailable(consequence);
    }
  }

  return {
    async ensureBucket(): Promise<void> {
      await send(async () => {
        try {
          await client.send(new HeadBucketCommand({ Bucket: s.bucket }));
        } catch (err) {
          if (isUnreachable(err)) throw err;
          await client.send(new CreateBucketCommand({ Bucket: s.bucket }));
        }
      }, ", so the bucket for attachments could not be checked");
    },
    /** Keeps `body` under `key`, typed as `contentType`. */
    async putObject(key: string, body: Buffer, contentType: string): Promise<void> {
      await send(
        () => client.send(new PutObjectCommand({ Bucket: s.bucket, Key: key, Body: body, ContentType: contentType })),
        ", so the file was not saved",
      );
    },
    /** Keeps the file at `filePath` (`size` bytes) under `key`, streamed from disk, never whole in memory. */
    async putFile(key: string, filePath: string, size: number, contentType: string): Promise<void> {
      await send(
        () => client.send(new PutObjectCommand({ Bucket: s.bucket, Key: key, Body: createReadStream(filePath), ContentLength: size, ContentType: contentType })),
        ", so the file was not archived",
      );
    },
    /** Removes the object under `key` (a removed attachment); removing one that is gone already is not an error. */
    async deleteObject(key: string): Promise<void> {
      await send(() => client.send(new DeleteObjectCommand({ Bucket: s.bucket, Key: key })), ", so the file was not removed");
    },
    /** The object under `key` as a stream, so a large file is passed on without being held whole in memory. */
    async getObject(key: string, consequence = ", so the file cannot be read"): Promise<StoredObject> {
      const out = await send(() => client.send(new GetObjectCommand({ Bucket: s.bucket, Key: key })), consequence);
      if (!(out.Body instanceof Readable)) throw new HttpError(502, "storage_unreadable", "Object storage answered without the file's contents; try again.");
      return { body: out.Body, contentLength: out.ContentLength };
    },
    /** The whole object under `key` in memory (for small files, e.g. photos embedded in a packet). */
    async readObject(key: string, consequence = ", so the file cannot be read"): Promise<Buffer> {
      // the read is inside `send`, so a store that goes away mid-body is storage_unavailable too
      return await send(async () => {
        const out = await client.send(new GetObjectCommand({ Bucket: s.bucket, Key: key }));
        if (!(out.Body instanceof Readable)) throw new HttpError(502, "storage_unreadable", "Object storage answered without the file's contents; try again.");
        return await buffer(out.Body);
      }, consequence);
    },
    /**
     * Whether the store answers now (its bucket can be read), from a probe at most PROBE_TTL_MS old or the
     * outcome of the latest request; never throws. An arrow so callers may pass it on unbound.
     */
    available: async (): Promise<boolean> => {
      if (known && Date.now() - known.at < PROBE_TTL_MS) return known.ok;
      probing ??= client
        .send(new HeadBucketCommand({ Bucket: s.bucket }), { abortSignal: AbortSignal.timeout(PROBE_TIMEOUT_MS) })
        // a refusal (no bucket, wrong keys) leaves attachments as unusable as silence does
        .then(
          () => true,
          () => false,
        )
        .then((ok) => {
          note(ok);
          return ok;
        })
        .finally(() => {
          probing = null;
        });
      return await probing;
    },
  };
}
export type Storage = ReturnType<typeof createStorage>;
