/**
 * Ironledger's import boundaries (DEVELOPERS.md, "Rooms and what each may import", says the same in words).
 * `npm test` runs this before the type-check; a violation prints the rule's name and both files.
 * TypeScript 7 is read through babel (dependency-cruiser 17 reads TypeScript below 7 only).
 */
const APP = "^(src|server|etl|shared|migrations|scripts)/";

module.exports = {
  forbidden: [
    {
      name: "no-import-cycles",
      severity: "error",
      comment: "No module may reach itself again through its imports.",
      from: {},
      to: { circular: true },
    },
    {
      name: "client-stays-in-the-browser",
      severity: "error",
      comment: "src/ never imports server/, etl/, migrations/ or scripts/: only shared/ crosses to the client.",
      from: { path: "^src/" },
      to: { path: "^(server|etl|migrations|scripts)/" },
    },
    {
      name: "client-uses-no-node-modules",
      severity: "error",
      comment: "src/ and shared/ run in the browser: no Node built-in modules (fs, crypto, path…).",
      from: { path: "^(src|shared)/" },
      to: { dependencyTypes: ["core"] },
    },
    {
      name: "shared-is-self-contained",
      severity: "error",
      comment: "shared/ imports nothing of the project outside shared/ (npm packages are fine).",
      from: { path: "^shared/" },
      to: { path: APP, pathNot: "^shared/" },
    },
    {
      name: "analytics-are-pure",
      severity: "error",
      comment:
        "server/analytics/ computes: it imports only itself, shared/ and the numeric libraries (jstat, d3-array); no server/db, no node I/O modules, no express.",
      from: { path: "^server/analytics/" },
      to: {
        pathNot: ["^server/analytics/", "^shared/", "^node_modules/(jstat|d3-array|internmap)/"],
      },
    },
    {
      name: "routes-do-not-import-routes",
      severity: "error",
      comment: "A route file never imports another route file; what two routes share lives in a service, shared/ or server/auth.",
      from: { path: "^server/routes/(?!index\\.ts$)" },
      to: { path: "^server/routes/" },
    },
    {
      name: "only-the-app-mounts-routes",
      severity: "error",
      comment: "Route files are mounted by server/app.ts and server/routes/index.ts; nothing else imports them (a service never does).",
      from: { path: "^(src|server|etl|shared|migrations|scripts)/", pathNot: ["^server/app\\.ts$", "^server/routes/"] },
      to: { path: "^server/routes/" },
    },
    {
      name: "object-storage-through-its-service",
      severity: "error",
      comment: "Only server/services/storage.ts talks to the S3 SDK; routes and other services call it.",
      from: { path: "^(server|etl|scripts)/", pathNot: ["^server/services/storage\\.ts$", "^server/dev/"] },
      to: { path: "@aws-sdk/" },
    },
    {
      name: "dev-fakes-only-through-the-stack",
      severity: "error",
      comment: "The local fakes (server/dev/) are started by server/stack.ts (and the test stack) only; the app talks to their interfaces.",
      from: { path: "^(src|server|etl|shared|migrations|scripts)/", pathNot: ["^server/dev/", "^server/stack\\.ts$"] },
      to: { path: "^server/dev/" },
    },
    {
      name: "migrations-import-no-app-code",
      severity: "error",
      comment: "A migration is frozen history: it imports kysely and nothing of the application.",
      from: { path: "^migrations/" },
      to: { path: APP, pathNot: "^migrations/" },
    },
    {
      name: "server-reaches-etl-through-its-seam",
      severity: "error",
      comment: "server/ imports the ETL only through etl/index.ts, the ETL's one public module.",
      from: { path: "^server/" },
      to: { path: "^etl/", pathNot: "^etl/index\\.ts$" },
    },
    {
      name: "etl-does-not-import-server",
      severity: "error",
      comment: "etl/ never imports server/: it owns loading and the derived tables, and is called, not calling.",
      from: { path: "^etl/" },
      to: { path: "^server/" },
    },
    {
      name: "tests-and-scripts-not-imported",
      severity: "error",
      comment: "Application code never imports tests/ or scripts/.",
      from: { path: "^(src|server|etl|shared|migrations)/" },
      to: { path: "^(tests|scripts)/" },
    },
    {
      name: "no-unresolvable-imports",
      severity: "error",
      comment: "Every import resolves to a file or an installed package.",
      from: {},
      to: { couldNotResolve: true },
    },
  ],
  options: {
    doNotFollow: { path: "node_modules" },
    exclude: { path: "^(dist|\\.data|test-artifacts)/" },
    tsConfig: { fileName: "tsconfig.json" },
    babelConfig: { fileName: ".babelrc.depcruise.json" },
    enhancedResolveOptions: {
      exportsFields: ["exports"],
      conditionNames: ["import", "require", "node", "default", "types"],
      extensions: [".ts", ".tsx", ".js", ".mjs", ".cjs", ".json", ".d.ts"],
    },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
