import { defineConfig } from "vitest/config";
import base from "./vitest.config.js";

/** vitest.config.ts without its globalSetup (which builds a PostgreSQL template): for pure unit tests. */
const { globalSetup: _postgresSetup, ...test } = base.test ?? {};

export default defineConfig({ ...base, test });
