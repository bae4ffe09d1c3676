export const TEMPLATE_DB = "ironledger_test_template";

/** The throwaway cluster that scripts/test.sh starts (never the demo cluster). */
export function adminUrl(database: string): string {
  const base = process.env.TEST_PG_URL;
  if (!base) throw new Error("TEST_PG_URL is not set: run the tests with `npm test`, which starts a throwaway PostgreSQL");
  const u = new URL(base);
  u.pathname = `/${database}`;
  return u.toString();
}
