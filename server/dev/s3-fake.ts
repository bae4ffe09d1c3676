import S3rver from "s3rver";
import { mkdirSync } from "node:fs";

/** A loopback S3-compatible object store (s3rver) keeping objects under `dir`. */
export async function startS3Fake(port: number, dir: string, bucket: string) {
  mkdirSync(dir, { recursive: true });
  const server = new S3rver({ port, address: "127.0.0.1", silent: true, directory: dir, configureBuckets: [{ name: bucket, configs: [] }] });
  await server.run();
  return { endpoint: `http://127.0.0.1:${port}`, close: () => server.close() };
}
