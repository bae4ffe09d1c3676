/** The filing deadline of a claim and the order of the claim queue. */
import { addDays, daysBetween } from "../../../shared/dates.js";
import { plural } from "../../../shared/text.js";

/** Filing days after the repair order closed when no policy says otherwise (common practice, no source). */
export const DEFAULT_CLAIM_DAYS = 30;

export interface Deadline {
  deadline: string;
  /** calendar days from today to the deadline: 0 on the day, negative once it has passed */
  daysLeft: number;
  state: "open" | "due_today" | "overdue";
  text: string;
}

/** The filing deadline (RO close + claim days) and the days left to it, with the arithmetic as text. */
export function filingDeadline(closedDate: string, claimDays: number, today: string): Deadline {
  const deadline = addDays(closedDate, claimDays);
  const daysLeft = daysBetween(today, deadline);
  const sum = `RO closed ${closedDate} + ${plural(claimDays, "day")} = deadline ${deadline}`;
  if (daysLeft > 0) return { deadline, daysLeft, state: "open", text: `${sum}; ${plural(daysLeft, "day")} left.` };
  if (daysLeft === 0) return { deadline, daysLeft, state: "due_today", text: `${sum}; due today.` };
  return { deadline, daysLeft, state: "overdue", text: `${sum}; overdue by ${plural(-daysLeft, "day")}.` };
}

/** Queue order: the nearest deadline first, overdue claims after the ones that can still be filed. */
export function compareByDeadline(a: { daysLeft: number }, b: { daysLeft: number }): number {
  const ao = a.daysLeft < 0 ? 1 : 0;
  const bo = b.daysLeft < 0 ? 1 : 0;
  if (ao !== bo) return ao - bo;
  return ao ? b.daysLeft - a.daysLeft : a.daysLeft - b.daysLeft;
}
