import { hash } from "node:crypto";

/**
 * The warehouse's surrogate keys computed in the loader, identical to the SQL function wh_key(text)
 * (migrations/0002): the first 16 hex digits of md5(natural key) read as a signed 64-bit integer.
 * Returned as a decimal string, the form pg uses for int8 and COPY expects.
 */
export function whKey(naturalKey: string): string {
  return BigInt.asIntN(64, BigInt("0x" + hash("md5", naturalKey).slice(0, 16))).toString();
}

/**
 * whKey with a per-load memo, for dimension keys that repeat on many rows (shops, machines, parts…):
 * `keys.of("machine", serial)` is whKey("machine|" + serial). Looked up by the parts themselves, so a
 * repeated key costs a map lookup and no string building.
 */
export class KeyCache {
  private readonly memo = new Map<string, Map<string, string | Map<string, string>>>();
  private size = 0;

  of(namespace: string, a: string, b?: string): string {
    let ns = this.memo.get(namespace);
    if (!ns) this.memo.set(namespace, (ns = new Map()));
    if (b === undefined) {
      let k = ns.get(a) as string | undefined;
      if (k === undefined) {
        k = whKey(`${namespace}|${a}`);
        if (this.room()) ns.set(a, k);
      }
      return k;
    }
    let inner = ns.get(a) as Map<string, string> | undefined;
    if (!inner) ns.set(a, (inner = new Map()));
    let k = inner.get(b);
    if (k === undefined) {
      k = whKey(`${namespace}|${a}|${b}`);
      if (this.room()) inner.set(b, k);
    }
    return k;
  }

  /** a file names a bounded set of dimension members; the cap keeps a pathological file from growing the memo */
  private room(): boolean {
    return this.size++ < 200_000;
  }
}
