// The Quality metrics filter, shared by the page and the CSV export route: an optional unit (absent = every unit
// where the reader holds metrics.view) and a range of local calendar dates, read in each unit's own time zone. Both
// dates or neither: absent means the last 7 complete days (resolved in lib/quality/metrics.ts, which knows the zone).
import { z } from "zod";
import { daysBetweenInclusive } from "./stats";

/** Longest range, in days: a year and a day covers any leap year (the page stays readable; the queries bounded). */
export const MAX_RANGE_DAYS = 366;

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const isCalendarDate = (d: string) => z.iso.date().safeParse(d).success;

const localDate = z.iso.date({ error: "Give a date as YYYY-MM-DD." });

export const qualityFilterSchema = z
  .object({
    unit: z.preprocess(blankToUndefined, z.uuid({ error: "Not a unit id." }).optional()),
    from: z.preprocess(blankToUndefined, localDate.optional()),
    to: z.preprocess(blankToUndefined, localDate.optional()),
  })
  .superRefine((f, ctx) => {
    if ((f.from === undefined) !== (f.to === undefined)) {
      ctx.addIssue({ code: "custom", path: [f.from === undefined ? "from" : "to"], message: "Give both dates of the range, or neither for the last 7 complete days." });
      return;
    }
    if (f.from === undefined || f.to === undefined) return;
    // zod runs this refinement even when a date above failed (its issue is already reported): compare valid dates only.
    if (!isCalendarDate(f.from) || !isCalendarDate(f.to)) return;
    if (f.to < f.from) ctx.addIssue({ code: "custom", path: ["to"], message: "The last day must not be before the first." });
    else if (daysBetweenInclusive(f.from, f.to) > MAX_RANGE_DAYS) ctx.addIssue({ code: "custom", path: ["to"], message: `Choose at most ${MAX_RANGE_DAYS} days.` });
  });
export type QualityFilter = z.infer<typeof qualityFilterSchema>;
