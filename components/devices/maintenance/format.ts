// Calendar days of the maintenance log, as people read them.
import { format } from "date-fns";

/** "2027-01-12" → "Tue 12 Jan 2027". A calendar day has no time zone: it is formatted as written. */
export function formatDay(day: string): string {
  const [y, m, d] = day.split("-").map(Number);
  return format(new Date(y!, m! - 1, d!), "EEE d MMM yyyy");
}

const days = (n: number) => `${n} day${n === 1 ? "" : "s"}`;

/** How a due date stands against today, in words: "Overdue by 3 days", "Due today", "Due in 12 days". */
export function dueWords(daysUntilDue: number): string {
  if (daysUntilDue < 0) return `Overdue by ${days(-daysUntilDue)}`;
  if (daysUntilDue === 0) return "Due today";
  if (daysUntilDue === 1) return "Due tomorrow";
  return `Due in ${days(daysUntilDue)}`;
}
