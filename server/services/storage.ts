import { S3Client, HeadBucketCommand, CreateBucketCommand } from "@aws-sdk/client-s3";

export interface StorageSettings {
  endpoint: string | null;
  region: string;
  bucket: string;
  accessKeyId: string | null;
  secretAccessKey: string | null;
}

/** Object storage through the AWS SDK; locally the same client talks to the s3rver fake on loopback. */
export function createStorage(s: StorageSettings) {
  const client = new S3Client({
    region: s.region,
    ...(s.endpoint ? { endpoint: s.endpoint, forcePathStyle: true } : {}),
    ...(s.accessKeyId && s.secretAccessKey
      ? { credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey } }
      : {}),
  });
  return {
    client,
    bucket: s.bucket,
    async ensureBucket(): Promise<void> {
      try {
        await client.send(new HeadBucketCommand({ Bucket: s.bucket }));
      } catch {
        await client.send(new CreateBucketCommand({ Bucket: s.bucket }));
      }
    },
  };
}
export type Storage = ReturnType<typeof createStorage>;
