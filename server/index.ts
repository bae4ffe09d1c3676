export {};
// The AWS SDK warns at load time that releases after January 2027 need Node 22; the pinned release works on 20.
const emit = process.emitWarning.bind(process);
process.emitWarning = ((w: string | Error, ...rest: unknown[]) => {
  const text = typeof w === "string" ? w : w.message;
  if (/AWS SDK for JavaScript/.test(text)) return;
  (emit as (...a: unknown[]) => void)(w, ...rest);
}) as typeof process.emitWarning;
const { loadConfig } = await import("./config.js");
const { startStack } = await import("./stack.js");
const { demoAccounts, DEMO_PASSWORD } = await import("./auth/demo-accounts.js");
const { logger } = await import("./logger.js");

const { loadDemo, warehouseIsEmpty } = await import("./demo/load-demo.js");
const path = await import("node:path");

const config = loadConfig();
const stack = await startStack(config);

if (config.loadDemo && (await warehouseIsEmpty(stack.db))) {
  process.stdout.write("The warehouse is empty: loading the demo world (first start only)…\n");
  const s = await loadDemo(stack.db, stack.pool, { dir: path.join(config.dataDir, "demo"), log: (l) => process.stdout.write(l + "\n") });
  process.stdout.write(`Demo loaded: ${s.files} files, ${s.read.toLocaleString("en-US")} rows read, ${s.rejected.toLocaleString("en-US")} rejected with reasons, in ${s.seconds.toFixed(0)} s.\n`);
}

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  logger.info(`${signal}: stopping Ironledger`);
  await stack.close();
  process.exit(0);
};
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));

const lines = [
  "",
  `Ironledger is running at ${stack.url}`,
  config.oidc.issuer
    ? `Sign-in: ${stack.issuer}`
    : `Local sign-in (${stack.issuer}), password for every demo account: ${DEMO_PASSWORD}`,
  ...(config.oidc.issuer ? [] : demoAccounts.map((a) => `  ${a.username.padEnd(12)} ${a.roles.join(", ")}${a.shops.length ? ` (${a.shops.join(", ")})` : ""}`)),
  "Press Ctrl-C to stop.",
  "",
];
process.stdout.write(lines.join("\n") + "\n");
