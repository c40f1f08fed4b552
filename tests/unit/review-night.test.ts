// Review nights (lib/review/night.ts): a night is the local 22:00 → 06:00 of the unit's IANA zone, named by the
// local date of its evening, so the nights across a DST change last 9 h (autumn) or 7 h (spring).
import { describe, expect, it } from "vitest";
import { localToInstant } from "@/lib/local-time";
import { annotationInstant, annotationSchema, annotationUpdateSchema } from "@/lib/review/annotations.validation";
import { lastCompletedNight, latestNight, nightParamSchema, nightsOfStay, reviewNight, type NightTimes } from "@/lib/review/night";

const HOUR = 3_600_000;
const NY: NightTimes = { timeZone: "America/New_York", startsAt: "22:00", endsAt: "06:00" };
const BERLIN: NightTimes = { timeZone: "Europe/Berlin", startsAt: "22:00", endsAt: "06:00" };

describe("reviewNight across DST changes (source: DOMAIN §3.2 W5, IANA tz database checked with Python zoneinfo)", () => {
  // Each row: the night's name, its bounds in UTC and its length. The UTC bounds follow from the offsets in force:
  // New York EDT −04:00 / EST −05:00; Berlin CEST +02:00 / CET +01:00 (IANA tz database, 2025–2026 rules).
  const cases: { times: NightTimes; night: string; from: string; to: string; hours: number }[] = [
    { times: NY, night: "2025-11-01", from: "2025-11-02T02:00:00.000Z", to: "2025-11-02T11:00:00.000Z", hours: 9 },
    { times: NY, night: "2026-03-07", from: "2026-03-08T03:00:00.000Z", to: "2026-03-08T10:00:00.000Z", hours: 7 },
    { times: NY, night: "2026-10-31", from: "2026-11-01T02:00:00.000Z", to: "2026-11-01T11:00:00.000Z", hours: 9 },
    // An ordinary winter night: EST on both sides.
    { times: NY, night: "2026-11-30", from: "2026-12-01T03:00:00.000Z", to: "2026-12-01T11:00:00.000Z", hours: 8 },
    { times: BERLIN, night: "2025-10-25", from: "2025-10-25T20:00:00.000Z", to: "2025-10-26T05:00:00.000Z", hours: 9 },
    { times: BERLIN, night: "2026-03-28", from: "2026-03-28T21:00:00.000Z", to: "2026-03-29T04:00:00.000Z", hours: 7 },
  ];
  for (const c of cases) {
    it(`${c.times.timeZone} ${c.night} lasts ${c.hours} h`, () => {
      const n = reviewNight(c.night, c.times);
      expect(n.night).toBe(c.night);
      expect(n.from.toISOString()).toBe(c.from);
      expect(n.to.toISOString()).toBe(c.to);
      expect(n.hours).toBe(c.hours);
    });
  }

  it("refuses a night name that is not a date", () => {
    expect(() => reviewNight("1 Nov", NY)).toThrow(RangeError);
  });
});

describe("latestNight: last night in the morning, tonight from the evening start (source: the night's definition above)", () => {
  it("is the previous evening's night until 22:00 local, and tonight from 22:00 on", () => {
    // 21:59 EST on 30 Nov 2026 is 02:59Z on 1 Dec; 22:00 EST is 03:00Z.
    expect(latestNight(new Date("2026-12-01T02:59:59.999Z"), NY).night).toBe("2026-11-29");
    expect(latestNight(new Date("2026-12-01T03:00:00.000Z"), NY).night).toBe("2026-11-30");
    // 07:00 EST next morning: the night that ended an hour ago.
    expect(latestNight(new Date("2026-12-01T12:00:00.000Z"), NY).night).toBe("2026-11-30");
  });

  it("uses the local date, not the UTC date: 23:30 EST is already the next UTC day", () => {
    const n = latestNight(new Date("2026-12-01T04:30:00.000Z"), NY);
    expect(n.night).toBe("2026-11-30");
    expect(n.from.getTime()).toBeLessThanOrEqual(Date.parse("2026-12-01T04:30:00.000Z"));
  });

  it("on the spring-forward evening starts at 22:00 EST and still names the evening's date", () => {
    // 22:00 EST on 7 Mar 2026 = 03:00Z on 8 Mar; one minute before it, the latest night is 6 Mar.
    expect(latestNight(new Date("2026-03-08T02:59:00.000Z"), NY).night).toBe("2026-03-06");
    const n = latestNight(new Date("2026-03-08T03:00:00.000Z"), NY);
    expect(n.night).toBe("2026-03-07");
    expect(n.hours).toBe(7);
  });
});

describe("lastCompletedNight: the night that has ended, even while tonight is in progress (source: the definition above)", () => {
  it.each([
    { now: "2026-12-02T20:00:00Z", local: "15:00 EST on 2 Dec", night: "2026-12-01" },
    { now: "2026-12-03T04:00:00Z", local: "23:00 EST on 2 Dec, tonight under way", night: "2026-12-01" },
    { now: "2026-12-03T08:00:00Z", local: "03:00 EST on 3 Dec, tonight under way", night: "2026-12-01" },
    { now: "2026-12-03T11:00:00Z", local: "06:00 EST on 3 Dec, the instant tonight ends", night: "2026-12-02" },
  ])("at $local it is the night of $night", ({ now, night }) => {
    const n = lastCompletedNight(new Date(now), NY);
    expect(n.night).toBe(night);
    expect(n.to.getTime()).toBeLessThanOrEqual(Date.parse(now));
  });
});

describe("nightsOfStay", () => {
  const until = new Date("2026-12-01T12:00:00.000Z"); // 07:00 EST, 1 Dec

  it("lists the nights from the one holding admission to the latest, newest first", () => {
    // Admitted 15:00 EST on 28 Nov: the night of the 28th ends after admission, so it counts.
    const nights = nightsOfStay(new Date("2026-11-28T20:00:00.000Z"), until, NY);
    expect(nights.map((n) => n.night)).toEqual(["2026-11-30", "2026-11-29", "2026-11-28"]);
    expect(nights.every((n) => n.hours === 8)).toBe(true);
  });

  it("leaves out a night that ended before admission", () => {
    // Admitted 07:00 EST on 29 Nov, an hour after the night of the 28th ended.
    expect(nightsOfStay(new Date("2026-11-29T12:00:00.000Z"), until, NY).map((n) => n.night)).toEqual(["2026-11-30", "2026-11-29"]);
  });

  it("stops at the given maximum", () => {
    expect(nightsOfStay(new Date(until.getTime() - 60 * 24 * HOUR), until, NY, 5)).toHaveLength(5);
  });
});

describe("nightParamSchema", () => {
  it("accepts calendar dates and refuses impossible ones (source: Gregorian calendar)", () => {
    expect(nightParamSchema.safeParse("2028-02-29").success).toBe(true); // 2028 is a leap year
    expect(nightParamSchema.safeParse("2026-02-29").success).toBe(false);
    expect(nightParamSchema.safeParse("2026-13-01").success).toBe(false);
    expect(nightParamSchema.safeParse("2026-1-01").success).toBe(false);
  });
});

describe("annotation times: the unit's wall clock to an instant (source: DOMAIN §3.2 W5, IANA tz database)", () => {
  it("finds both instants of a local time the autumn change repeats", () => {
    // W5: in New York, local 01:30 on 2 Nov 2025 occurs at 05:30Z (EDT) and 06:30Z (EST).
    expect(localToInstant("2025-11-02T01:30", NY.timeZone)).toEqual({
      kind: "ambiguous",
      earlier: new Date("2025-11-02T05:30:00Z"),
      later: new Date("2025-11-02T06:30:00Z"),
      earlierZone: "EDT",
      laterZone: "EST",
    });
    // Berlin falls back from 03:00 CEST to 02:00 CET on 26 Oct 2025: 02:30 is 00:30Z and 01:30Z.
    const berlin = localToInstant("2025-10-26T02:30", BERLIN.timeZone);
    expect(berlin.kind === "ambiguous" && [berlin.earlier.toISOString(), berlin.later.toISOString()]).toEqual(["2025-10-26T00:30:00.000Z", "2025-10-26T01:30:00.000Z"]);
  });

  it("says a local time the spring change skipped does not exist", () => {
    // New York: 02:00 EST → 03:00 EDT on 8 Mar 2026; Berlin: 02:00 CET → 03:00 CEST on 29 Mar 2026.
    expect(localToInstant("2026-03-08T02:30", NY.timeZone)).toEqual({ kind: "missing" });
    expect(localToInstant("2026-03-29T02:59", BERLIN.timeZone)).toEqual({ kind: "missing" });
    expect(localToInstant("2026-03-08T03:00", NY.timeZone)).toEqual({ kind: "ok", at: new Date("2026-03-08T07:00:00Z") });
  });

  it("reads an ordinary time once, seconds ignored", () => {
    expect(localToInstant("2026-11-30T23:15:42", NY.timeZone)).toEqual({ kind: "ok", at: new Date("2026-12-01T04:15:00Z") });
  });

  it("keeps an annotation within its stay, and asks which time on the repeated hour", () => {
    const stay = { timeZone: NY.timeZone, admittedAt: new Date("2025-11-01T22:00:00Z"), dischargedAt: null };
    const now = new Date("2025-11-02T12:00:00Z");
    expect(annotationInstant({ occurredAt: "2025-11-02T01:30" }, stay, now)).toMatchObject({ ok: false, field: "occurrence" });
    expect(annotationInstant({ occurredAt: "2025-11-02T01:30", occurrence: "later" }, stay, now)).toEqual({ ok: true, at: new Date("2025-11-02T06:30:00Z") });
    expect(annotationInstant({ occurredAt: "2025-11-01T17:59" }, stay, now)).toMatchObject({ ok: false, field: "occurredAt" }); // 21:59Z, before admission
    expect(annotationInstant({ occurredAt: "2025-11-02T07:01" }, stay, now)).toMatchObject({ ok: false, field: "occurredAt", message: expect.stringMatching(/future/) });
  });
});

describe("annotationSchema", () => {
  const valid = { stayId: "7c9e6679-7425-40de-944b-e07fc1f90ae7", occurredAt: "2026-11-30T23:15", kind: "medication", note: "  Invented: analgesic given  " };

  it("accepts a form's fields, trims the note and treats an unchosen occurrence as absent", () => {
    expect(annotationSchema.parse({ ...valid, occurrence: "" })).toEqual({ ...valid, note: "Invented: analgesic given" });
    expect(annotationUpdateSchema.parse({ ...valid, id: valid.stayId, version: "3" }).version).toBe(3);
  });

  it("refuses an empty or over-long note, an unknown kind and a time that is not a local date-time", () => {
    const fields = (input: object) => annotationSchema.safeParse(input).error?.issues.map((i) => i.path[0]);
    expect(fields({ ...valid, note: "   " })).toEqual(["note"]);
    expect(fields({ ...valid, note: "x".repeat(501) })).toEqual(["note"]);
    expect(annotationSchema.safeParse({ ...valid, note: "x".repeat(500) }).success).toBe(true);
    expect(fields({ ...valid, kind: "alarm" })).toEqual(["kind"]);
    expect(fields({ ...valid, occurredAt: "2026-11-30T23:15:00Z" })).toEqual(["occurredAt"]);
  });
});
