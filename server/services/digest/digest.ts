/**
 * The weekly digest by e-mail: for each user whose chosen weekday it is, the sections their roles get (each
 * read in their own shop scope, as the pages read it), sent once per ISO week over SMTP. A pg-boss schedule
 * runs it every day at 06:00 UTC; a run for a day sends only to the users whose chosen weekday is that day (or
 * earlier that week, when a run was missed) and who have not had that week's digest, so it can run any number
 * of times.
 */
import type PgBoss from "pg-boss";
import type { Db } from "../../db/database.js";
import type { Mailer } from "../mailer.js";
import { logger } from "../../logger.js";
import { scopeFor } from "../../auth/require-user.js";
import { effectiveUser } from "../../auth/effective-user.js";
import { benchmarkService, type BenchmarkService } from "../benchmarks/service.js";
import { readSettings } from "../../db/queries/settings.js";
import { claimDigestWeek, digestRecipients, markDigestSent, releaseDigestWeek, type DigestRecipient } from "../../db/queries/digest.js";
import { createFormat } from "../../../shared/format.js";
import { roleSchema, type Role } from "../../../shared/roles.js";
import type { Digest, DigestRun } from "../../../shared/schemas/digest.js";
import type { SessionUser } from "../../auth/session.js";
import { digestSections } from "./sections.js";
import type { DigestReader } from "./section.js";
import { digestWeek, plusDays } from "./week.js";
import { digestSubject, renderDigest } from "./render.js";
import { todayIso } from "../../../shared/dates.js";

export const DIGEST_QUEUE = "weekly-digest";
/** Every day at 06:00 UTC; each user's chosen weekday picks the day their digest goes. */
export const DIGEST_CRON = "0 6 * * *";
export const DIGEST_TIME_ZONE = "UTC";

/** The reader as a request would see them: provider claims, replaced by the access an administrator stored. */
export function readerOf(u: { sub: string; name: string; roles: readonly string[]; shops: string[] }, stored: { roles: string[] | null; shops: string[] | null } = { roles: null, shops: null }): DigestReader {
  const known = (rs: readonly string[]) => rs.filter((r): r is Role => roleSchema.safeParse(r).success);
  const roles = known(stored.roles ?? u.roles);
  const claims: SessionUser = { sub: u.sub, name: u.name, email: null, roles: known(u.roles), shops: u.shops };
  const eff = effectiveUser(claims, stored.roles && stored.shops ? { access: { roles, shops: stored.shops }, deactivated: false } : null);
  return { sub: eff.sub, name: eff.name, roles: eff.roles, scope: scopeFor(eff) };
}

export interface BuildDeps {
  db: Db;
  benchmarks?: BenchmarkService;
}

/**
 * The reader's digest for the ISO week of `date`: every section their roles get, built from data read in
 * their scope. Changes are counted from `since`. `base` is put before every page path (the public URL in mail;
 * "" for the preview inside the app).
 */
export async function buildDigest(deps: BuildDeps, reader: DigestReader, date: string, since: Date, base: string): Promise<Digest> {
  const week = digestWeek(date);
  const benchmarks = deps.benchmarks ?? benchmarkService(deps.db);
  const format = createFormat({ locale: "en-US", currency: (await readSettings(deps.db)).currency, timeZone: "UTC" });
  const ctx = { db: deps.db, benchmarks, reader, date, since };
  const tools = { link: (path: string) => `${base}${path}`, format };
  const sections = [];
  for (const s of digestSections) {
    if (!s.appliesTo(reader)) continue;
    sections.push(s.build(await s.load(ctx), tools));
  }
  return { week: week.key, weekLabel: week.label, subject: digestSubject(week.label), since: since.toISOString(), sections };
}

/** Changes count from the last digest sent; before the first one, from a week before the day. */
export const sinceFor = (date: string, lastSentAt: Date | string | null): Date => (lastSentAt ? new Date(lastSentAt) : new Date(`${plusDays(date, -7)}T00:00:00Z`));

export interface RunDeps {
  db: Db;
  mailer: Mailer;
  publicUrl: string;
}

async function sendOne(deps: RunDeps & { benchmarks: BenchmarkService }, u: DigestRecipient, date: string): Promise<"sent" | "skipped"> {
  const week = digestWeek(date);
  const reader = readerOf({ sub: u.sub, name: u.name, roles: u.roles, shops: u.shops }, { roles: u.access_roles, shops: u.access_shops });
  if (!digestSections.some((s) => s.appliesTo(reader))) return "skipped";
  if (!(await claimDigestWeek(deps.db, u.sub, week.key))) return "skipped";
  try {
    const digest = await buildDigest(deps, reader, date, sinceFor(date, u.last_sent_at), deps.publicUrl);
    const mail = renderDigest(digest, { name: u.name || u.email! }, `${deps.publicUrl}/account`);
    const info = await deps.mailer.transport.sendMail({ from: deps.mailer.from, to: u.email!, subject: mail.subject, text: mail.text, html: mail.html });
    await markDigestSent(deps.db, u.sub, week.key, info.messageId);
    return "sent";
  } catch (err) {
    await releaseDigestWeek(deps.db, u.sub, week.key);
    throw err;
  }
}

/**
 * Sends the digest of `date`'s ISO week to the users whose chosen weekday is `date`'s or earlier in that week
 * and who have not had it:
 * active users with an e-mail address whose roles get at least one section. A user whose send fails is
 * left for the next run (the week is given back); the others go on.
 */
export async function runDigests(deps: RunDeps, date: string): Promise<DigestRun> {
  const week = digestWeek(date);
  const benchmarks = benchmarkService(deps.db);
  const run: DigestRun = { date, week: week.key, sent: 0, skipped: 0, failed: 0 };
  for (const u of await digestRecipients(deps.db, week.isoDay, week.key)) {
    try {
      run[await sendOne({ ...deps, benchmarks }, u, date)]++;
    } catch (err) {
      run.failed++;
      logger.warn({ err, sub: u.sub, week: week.key }, "weekly digest not sent; the next run tries again");
    }
  }
  return run;
}

/** The daily schedule (06:00 UTC) and its worker, which runs the digest for the day it runs on. */
export async function startDigestSchedule(deps: RunDeps & { boss: PgBoss }): Promise<void> {
  const { boss } = deps;
  await boss.createQueue(DIGEST_QUEUE);
  await boss.schedule(DIGEST_QUEUE, DIGEST_CRON, {}, { tz: DIGEST_TIME_ZONE });
  await boss.work(DIGEST_QUEUE, { pollingIntervalSeconds: 30 }, async () => {
    const run = await runDigests(deps, todayIso());
    logger.info(run, "weekly digest run");
  });
}
