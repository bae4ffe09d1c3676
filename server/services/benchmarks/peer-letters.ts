/**
 * Letters for the shops a caller may not name, shuffled by a keyed hash (HMAC-SHA-256) of the period, the
 * caller's own shops and the shop: stable for one period and caller, unrelated between periods, and not
 * reproducible without the server's secret, so neither the order nor the letter gives a shop away.
 */
import { createHmac } from "node:crypto";
import { lettersByRank } from "../../analytics/benchmark-letters.js";

export function peerLetters(codes: readonly string[], periodKey: string, viewerKey: string, secret: string): Map<string, string> {
  return lettersByRank(codes.map((c) => [c, createHmac("sha256", secret).update(`${periodKey}|${viewerKey}|${c}`).digest("hex")] as const));
}
