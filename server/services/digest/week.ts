import { addDays, format, getISODay, getISOWeek, getISOWeekYear, parseISO, startOfISOWeek } from "date-fns";

export interface DigestWeek {
  /** ISO 8601 week, "2025-W28" */
  key: string;
  /** Monday and Sunday of the week, ISO dates */
  monday: string;
  sunday: string;
  /** "week 28, 7–13 July 2025" */
  label: string;
  /** ISO weekday of the day asked for, 1 = Monday … 7 = Sunday */
  isoDay: number;
}

/** The ISO 8601 week (weeks start on Monday; week 1 holds the year's first Thursday) of an ISO date. */
export function digestWeek(date: string): DigestWeek {
  const d = parseISO(date);
  if (Number.isNaN(d.getTime()) || !/^\d{4}-\d{2}-\d{2}$/.test(date)) throw new Error(`not an ISO date: ${date}`);
  const monday = startOfISOWeek(d);
  const sunday = addDays(monday, 6);
  const week = getISOWeek(d);
  const sameMonth = monday.getMonth() === sunday.getMonth();
  const sameYear = monday.getFullYear() === sunday.getFullYear();
  const span = sameMonth
    ? `${format(monday, "d")}–${format(sunday, "d MMMM yyyy")}`
    : sameYear
      ? `${format(monday, "d MMMM")} – ${format(sunday, "d MMMM yyyy")}`
      : `${format(monday, "d MMMM yyyy")} – ${format(sunday, "d MMMM yyyy")}`;
  return {
    key: `${getISOWeekYear(d)}-W${String(week).padStart(2, "0")}`,
    monday: format(monday, "yyyy-MM-dd"),
    sunday: format(sunday, "yyyy-MM-dd"),
    label: `week ${week}, ${span}`,
    isoDay: getISODay(d),
  };
}

/** An ISO date plus whole days. */
export const plusDays = (date: string, days: number): string => format(addDays(parseISO(date), days), "yyyy-MM-dd");
