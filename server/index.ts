import { loadConfig } from "./config.js";
import { startStack } from "./stack.js";
import { demoAccounts, DEMO_PASSWORD } from "./auth/demo-accounts.js";
import { logger } from "./logger.js";

const config = loadConfig();
const stack = await startStack(config);

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
