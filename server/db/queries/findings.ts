import { sql } from "kysely";
import type { Db } from "../database.js";
import type { FindingChange, FindingState } from "../../../shared/schemas/findings.js";
import { findingTrend } from "../../../shared/finding-key.js";

/**
 * Findings' states (finding_state, finding_event; migrations/0056). The figures are recorded from the
 * group-wide scan at its default settings, once per data version (the answer warmer asks for it after every
 * load), so "stronger" and "weaker" compare like with like.
 */
export interface FindingFigures {
  key: string;
  description: string;
  observed: number;
  expected: number;
  lower: number;
}

/** Records the figures of the group-wide scan's findings at data version `version`: new keys are found, moved figures kept with the ones before. */
export async function recordFindings(db: Db, version: string, items: readonly FindingFigures[]): Promise<void> {
  if (items.length === 0) return;
  await db.transaction().execute(async (tx) => {
    const found = await sql<{ finding_key: string }>`
      INSERT INTO finding_state (finding_key, description, seen_version, observed, expected, lower)
      SELECT * FROM unnest(${items.map((i) => i.key)}::text[], ${items.map((i) => i.description)}::text[], ${items.map(() => version)}::text[],
                           ${items.map((i) => i.observed)}::int[], ${items.map((i) => i.expected)}::float8[], ${items.map((i) => i.lower)}::float8[])
      ON CONFLICT (finding_key) DO NOTHING
      RETURNING finding_key`.execute(tx);
    if (found.rows.length) {
      await sql`INSERT INTO finding_event (finding_key, actor, kind, note)
        SELECT k, 'Ironledger', 'found', 'first found by the scan' FROM unnest(${found.rows.map((r) => r.finding_key)}::text[]) AS k`.execute(tx);
    }
    const moved = await sql<{ finding_key: string; from_value: string; to_value: string }>`
      WITH x AS (
        SELECT * FROM unnest(${items.map((i) => i.key)}::text[], ${items.map((i) => i.description)}::text[], ${items.map((i) => i.observed)}::int[],
                             ${items.map((i) => i.expected)}::float8[], ${items.map((i) => i.lower)}::float8[]) AS x(k, d, o, e, l)
      ), old AS (
        SELECT s.finding_key, s.observed, s.expected FROM finding_state s JOIN x ON x.k = s.finding_key
        WHERE s.seen_version <> ${version} AND (s.observed <> x.o OR abs(s.expected - x.e) > 1e-9 OR abs(s.lower - x.l) > 1e-9)
        FOR UPDATE OF s
      )
      UPDATE finding_state s SET prev_version = s.seen_version, prev_observed = s.observed, prev_expected = s.expected, prev_lower = s.lower,
        observed = x.o, expected = x.e, lower = x.l, description = x.d, seen_version = ${version}, figures_changed_at = now()
      FROM x, old WHERE x.k = s.finding_key AND old.finding_key = s.finding_key
      RETURNING s.finding_key, old.observed::text || ' failures, ' || round(old.expected::numeric, 1)::text || ' expected' AS from_value,
        x.o::text || ' failures, ' || round(x.e::numeric, 1)::text || ' expected' AS to_value`.execute(tx);
    if (moved.rows.length) {
      await sql`INSERT INTO finding_event (finding_key, actor, kind, from_value, to_value, note)
        SELECT k, 'Ironledger', 'figures', f, t, 'a load changed its figures'
        FROM unnest(${moved.rows.map((r) => r.finding_key)}::text[], ${moved.rows.map((r) => r.from_value)}::text[], ${moved.rows.map((r) => r.to_value)}::text[]) AS m(k, f, t)`.execute(tx);
    }
    await sql`UPDATE finding_state SET seen_version = ${version} WHERE finding_key = ANY(${items.map((i) => i.key)}::text[]) AND seen_version <> ${version}`.execute(tx);
  });
}

type StateRow = {
  finding_key: string; status: FindingState["status"]; owner: string | null; dismissed_reason: string | null; dismissed_at_observed: number | null;
  description: string; first_seen_at: Date; changed_at: Date; figures_changed_at: Date; observed: number; lower: number;
  prev_observed: number | null; prev_lower: number | null;
};

const present = (r: StateRow): FindingState => ({
  key: r.finding_key,
  status: r.status,
  owner: r.owner,
  dismissedReason: r.dismissed_reason,
  grewSinceDismissed: r.status === "dismissed" && r.dismissed_at_observed !== null && r.observed > r.dismissed_at_observed,
  description: r.description,
  firstSeenAt: r.first_seen_at.toISOString(),
  changedAt: r.changed_at.toISOString(),
  trend: findingTrend(r.prev_observed === null || r.prev_lower === null ? null : { observed: r.prev_observed, lower: r.prev_lower }, r),
  figuresChangedAt: r.figures_changed_at.toISOString(),
  observed: r.observed,
  previousObserved: r.prev_observed,
});

export async function listFindingStates(db: Db): Promise<FindingState[]> {
  const r = await sql<StateRow>`SELECT * FROM finding_state ORDER BY changed_at DESC`.execute(db);
  return r.rows.map(present);
}

export async function findingWork(db: Db, key: string) {
  const r = await sql<StateRow>`SELECT * FROM finding_state WHERE finding_key = ${key}`.execute(db);
  if (!r.rows[0]) return null;
  const events = await sql<{ at: Date; actor: string; kind: "found" | "status" | "owner" | "note" | "figures"; from_value: string | null; to_value: string | null; note: string | null }>`
    SELECT at, actor, kind, from_value, to_value, note FROM finding_event WHERE finding_key = ${key} ORDER BY at DESC, event_id DESC`.execute(db);
  return {
    state: present(r.rows[0]),
    events: events.rows.map((e) => ({ at: e.at.toISOString(), actor: e.actor, kind: e.kind, from: e.from_value, to: e.to_value, note: e.note })),
  };
}

/** Applies a change (status with its reason, owner, note) as one transaction with its events; false when the finding is unknown. */
export async function changeFinding(db: Db, key: string, c: FindingChange, actor: { name: string; sub: string }): Promise<boolean> {
  return db.transaction().execute(async (tx) => {
    const cur = (await sql<StateRow>`SELECT * FROM finding_state WHERE finding_key = ${key} FOR UPDATE`.execute(tx)).rows[0];
    if (!cur) return false;
    const events: { kind: string; from: string | null; to: string | null; note: string | null }[] = [];
    if (c.status !== undefined && c.status !== cur.status) {
      events.push({ kind: "status", from: cur.status, to: c.status, note: c.status === "dismissed" ? c.reason ?? null : (c.note || null) });
      await sql`UPDATE finding_state SET status = ${c.status}, changed_at = now(),
        dismissed_reason = ${c.status === "dismissed" ? c.reason ?? null : null},
        dismissed_at_observed = ${c.status === "dismissed" ? sql`observed` : sql`NULL`} WHERE finding_key = ${key}`.execute(tx);
    }
    if (c.owner !== undefined && (c.owner || null) !== cur.owner) {
      events.push({ kind: "owner", from: cur.owner, to: c.owner || null, note: null });
      await sql`UPDATE finding_state SET owner = ${c.owner || null}, changed_at = now() WHERE finding_key = ${key}`.execute(tx);
    }
    // a note said with a status change travels with it; on its own it is an event of its own
    if (c.note && !events.some((e) => e.kind === "status" && e.note === c.note)) {
      events.push({ kind: "note", from: null, to: null, note: c.note });
      await sql`UPDATE finding_state SET changed_at = now() WHERE finding_key = ${key}`.execute(tx);
    }
    for (const e of events) {
      await sql`INSERT INTO finding_event (finding_key, actor, actor_sub, kind, from_value, to_value, note)
        VALUES (${key}, ${actor.name}, ${actor.sub}, ${e.kind}, ${e.from}, ${e.to}, ${e.note})`.execute(tx);
    }
    return true;
  });
}
