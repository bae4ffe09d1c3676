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
 * whKey plus two 32-bit numbers from the rest of the same md5 (bits the key does not use), for a
 * membership filter over the keys (see KeySeenFilter).
 */
export function whKeyWithSpare(naturalKey: string): [key: string, a: number, b: number] {
  const hex = hash("md5", naturalKey);
  return [BigInt.asIntN(64, BigInt("0x" + hex.slice(0, 16))).toString(), parseInt(hex.slice(16, 24), 16), parseInt(hex.slice(24, 32), 16)];
}

/**
 * A Bloom filter over the natural keys of a file, in a fixed 16 MB whatever the file's size: `add`
 * answers whether the key may have come before. "No" is certain; "maybe" for a new key is rare (for a
 * million keys, five probes in 2^27 bits: a false "maybe" about once in a few dozen such files) and only
 * makes the loader run an exact check it could otherwise have skipped.
 */
export class KeySeenFilter {
  private static readonly BITS = 2 ** 27;
  private readonly bits = new Uint32Array(KeySeenFilter.BITS / 32);
  private readonly mask = KeySeenFilter.BITS - 1;

  add(a: number, b: number): boolean {
    let seen = true;
    for (let i = 0; i < 5; i++) {
      const bit = (a + Math.imul(i, b | 1)) & this.mask;
      const word = bit >>> 5;
      const m = 1 << (bit & 31);
      if ((this.bits[word] & m) === 0) {
        seen = false;
        this.bits[word] |= m;
      }
    }
    return seen;
  }
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
