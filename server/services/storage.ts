import { Readable } from "node:stream";
import { S3Client, HeadBucketCommand, CreateBucketCommand, GetObjectCommand, PutObjectCommand } from "@aws-sdk/client-s3";

/**
 * Object storage through the AWS SDK, the one module that talks to it; locally the same client talks to the
 * s3rver fake on loopback. Callers see keys, bytes and streams, never the SDK.
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

export function createStorage(s: StorageSettings) {
  const client = new S3Client({
    region: s.region,
    ...(s.endpoint ? { endpoint: s.endpoint, forcePathStyle: true } : {}),
    ...(s.accessKeyId && s.secretAccessKey
      ? { credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } }
      : {}),
  });
  return {
    async ensureBucket(): Promise<void> {
      try {
        await client.send(new HeadBucketCommand({ Bucket: s.bucket }));
      } catch {
        await client.send(new CreateBucketCommand({ Bucket: s.bucket }));
      }
    },
    /** Keeps `body` under `key`, typed as `contentType`. */
    async putObject(key: string, body: Buffer, contentType: string): Promise<void> {
      await client.send(new PutObjectCommand({ Bucket: s.bucket, Key: key, Body: body, ContentType: contentType }));
    },
    /** The object under `key` as a stream, so a large file is passed on without being held whole in memory. */
    async getObject(key: string): Promise<StoredObject> {
      const out = await client.send(new GetObjectCommand({ Bucket: s.bucket, Key: key }));
      if (!(out.Body instanceof Readable)) throw new Error(`Object storage returned no readable body for ${key}.`);
      return { body: out.Body, contentLength: out.ContentLength };
    },
  };
}
export type Storage = ReturnType<typeof createStorage>;
