/** The range of PostgreSQL's bigint, a signed 64-bit integer (PostgreSQL documentation, "Numeric Types"). */
const MIN = -(2n ** 63n);
const MAX = 2n ** 63n - 1n;

/** True when `s` is a whole number written in decimal digits that a bigint column can hold. */
export function isInt64(s: string): boolean {
  if (!/^-?\d{1,19}$/.test(s)) return false;
  const n = BigInt(s);
  return n >= MIN && n <= MAX;
}
