/** Small wording helpers for text shown to people (server messages and the client alike). */

/** "1 day", "3 days", "1,200 hours": the count in en-US digits with the noun in the right number. */
export const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en-US")} ${Math.abs(n) === 1 ? one : many}`;
