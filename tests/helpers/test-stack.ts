import { createServer } from "node:net";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { loadConfig } from "../../server/config.js";
import { startStack, type Stack } from "../../server/stack.js";
import { freshDemoDb, freshTestDb, type TestDb } from "./test-db.js";

export async function freePort(): Promise<number> {
  return await new Promise((resolve, reject) => {
    const s = createServer();
    s.unref();
    s.on("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

export interface TestStack extends Stack {
  tdb: TestDb;
  dataDir: string;
  stop(): Promise<void>;
}

/**
 * The whole product (app, local provider, SMTP and S3 fakes) on free loopback ports over a fresh database;
 * with `demo: true` the database holds the demo world at scale 1.
 */
export async function startTestStack(env: Record<string, string> = {}, o: { demo?: boolean } = {}): Promise<TestStack> {
  const tdb = o.demo ? await freshDemoDb() : await freshTestDb();
  const dataDir = mkdtempSync(path.join(tmpdir(), "ironledger-test-"));
  // a port found free can be taken by another test process before the stack listens on it: try fresh ports
  const start = async () =>
    startStack(
      loadConfig({
        PORT: String(await freePort()),
        LOCAL_OIDC_PORT: String(await freePort()),
        LOCAL_SMTP_PORT: String(await freePort()),
        LOCAL_S3_PORT: String(await freePort()),
        DATABASE_URL: tdb.url,
        DATA_DIR: dataDir,
        LOAD_DEMO: "0",
        WARM_ANSWERS: "0",
        ...env,
      }),
    );
  let stack: Stack | undefined;
  for (let attempt = 1; !stack; attempt++) {
    try {
      stack = await start();
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EADDRINUSE" || attempt >= 3) throw err;
    }
  }
  return {
    ...stack,
    tdb,
    dataDir,
    async stop() {
      await stack.close();
      await tdb.drop();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
