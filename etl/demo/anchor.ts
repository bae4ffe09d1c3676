/**
 * Where the demo world's history sits on the real calendar. The generator simulates in its own calendar
 * (window 2020-07-01..2025-06-30, scenario.ts) and writes every date moved so that the newest day of history
 * (repair orders, readings, weather) falls on the day before an anchor date:
 *
 * 1. Whole years: Y is the largest whole number of years with 2025-06-30 + Y years ≤ anchor − 1, and every
 *    written date moves by the days in those Y years. Seasons, winters, build windows and the planted
 *    signals keep their months (a day earlier or later at most, where a leap day falls in between).
 * 2. Pad: the remaining 0–365 days are simulated forward past the generator's own window end, the same
 *    processes continuing (weather, use, failures, PM), so the window ends exactly on anchor − 1.
 *
 * Anchor 2025-07-01 moves nothing and pads nothing: the generator's own calendar. At any anchor, work still
 * running on the last day is written open (lines.ts jobRecord).
 */
import { format } from "date-fns";
import { dayOf, isoOf } from "./calendar.js";
import { WINDOW_END, WINDOW_START } from "./scenario.js";

/** The anchor at which the generator's own calendar is written unmoved (its window ends the day before). */
export const CALENDAR_ANCHOR = "2025-07-01";

/** Anchors the generator accepts: its injected "future" years and two-digit codes assume the 21st century. */
const EARLIEST = "2000-01-01";
const LATEST = "2099-12-31";

export interface DemoTimeline {
  anchor: string;
  /** whole years every date moves by */
  years: number;
  /** the same move in days: added to every generator day on the way out */
  shiftDays: number;
  /** days simulated past the generator's own window end */
  padDays: number;
  /** last simulated day, generator calendar (WINDOW_END + padDays) */
  lastDay: number;
  /** the repair-history window as written */
  from: string;
  to: string;
}

/** What the simulation needs of a timeline: where history ends, and how far its written dates move. */
export type DemoClock = Pick<DemoTimeline, "lastDay" | "shiftDays">;

/** The generator's own calendar: no move, no pad. */
export const UNSHIFTED: DemoClock = { lastDay: WINDOW_END, shiftDays: 0 };

/** Checks an anchor given as text ('YYYY-MM-DD', a real calendar day this century); throws in words otherwise. */
export function parseAnchor(text: string): string {
  const t = text.trim();
  if (!/^\d{4}-\d{2}-\d{2}$/.test(t) || isoOf(dayOf(t)) !== t) throw new Error(`The demo anchor "${text}" is not a calendar date written YYYY-MM-DD.`);
  if (t < EARLIEST || t > LATEST) throw new Error(`The demo anchor ${t} is outside ${EARLIEST} to ${LATEST}.`);
  return t;
}

/** The day someone starts the demo, as their own calendar reads it (local time, not UTC). */
export function localToday(now: Date = new Date()): string {
  return format(now, "yyyy-MM-dd");
}

const ownEnd = isoOf(WINDOW_END);
const endInYear = (y: number): number => dayOf(`${y}${ownEnd.slice(4)}`);

export function demoTimeline(anchor: string): DemoTimeline {
  const a = parseAnchor(anchor);
  const last = dayOf(a) - 1;
  const ownYear = Number(ownEnd.slice(0, 4));
  let year = Number(isoOf(last).slice(0, 4));
  if (endInYear(year) > last) year--;
  const shiftDays = endInYear(year) - WINDOW_END;
  const padDays = last - endInYear(year);
  return {
    anchor: a, years: year - ownYear, shiftDays, padDays, lastDay: WINDOW_END + padDays,
    from: isoOf(WINDOW_START + shiftDays), to: isoOf(last),
  };
}
