import { describe, expect, it } from "vitest";
import { localRangeBound } from "@/lib/local-time";
import { formatDuration, formatLocal, formatLocalPrecise } from "@/lib/time";

// US DST rules for 2026 (Energy Policy Act of 2005): starts 8 March 02:00 local, ends 1 November 02:00 local.
const NY = "America/New_York";

describe("local time with offset", () => {
  it("shows the same instant with the offset in force on each side of the autumn change", () => {
    // 05:30Z on 1 Nov 2026 is 01:30 EDT (first pass); 06:30Z is 01:30 EST (the repeated hour).
    expect(formatLocalPrecise("2026-11-01T05:30:00Z", NY)).toBe("2026-11-01 01:30:00 -04:00");
    expect(formatLocalPrecise("2026-11-01T06:30:00Z", NY)).toBe("2026-11-01 01:30:00 -05:00");
    expect(formatLocal("2026-11-01T06:30:00Z", NY)).toBe("Sun 1 Nov, 01:30 EST");
  });

  it("skips the missing hour in spring", () => {
    // 06:59Z on 8 Mar 2026 is 01:59 EST; one minute later it is 03:00 EDT.
    expect(formatLocalPrecise("2026-03-08T06:59:00Z", NY)).toBe("2026-03-08 01:59:00 -05:00");
    expect(formatLocalPrecise("2026-03-08T07:00:00Z", NY)).toBe("2026-03-08 03:00:00 -04:00");
  });

  it("counts a fall-back night of 19:00–07:00 local as 13 hours of real time", () => {
    // 19:00 EDT 31 Oct = 23:00Z; 07:00 EST 1 Nov = 12:00Z.
    expect(formatDuration("2026-10-31T23:00:00Z", "2026-11-01T12:00:00Z")).toBe("13 h");
    expect(formatDuration("2026-12-01T00:00:00Z", "2026-12-03T05:00:00Z")).toBe("2 d 5 h");
    expect(formatDuration("2026-12-01T00:00:00Z", "2026-12-01T00:59:00Z")).toBe("under 1 h");
  });
});

describe("ends of a local time range (lib/local-time.ts localRangeBound)", () => {
  it("reads a repeated autumn time as its first pass where a range starts and its second where it ends", () => {
    // 01:30 on 1 Nov 2026 happens at 05:30Z (EDT) and again at 06:30Z (EST).
    expect(localRangeBound("2026-11-01T01:30", NY, "start")!.toISOString()).toBe("2026-11-01T05:30:00.000Z");
    expect(localRangeBound("2026-11-01T01:30", NY, "end")!.toISOString()).toBe("2026-11-01T06:30:00.000Z");
    expect(localRangeBound("2026-11-01T01:30:15", NY, "end")!.toISOString()).toBe("2026-11-01T06:30:15.000Z");
    // Outside the repeated hour both ends agree.
    expect(localRangeBound("2026-11-01T02:00", NY, "start")!.toISOString()).toBe("2026-11-01T07:00:00.000Z");
    expect(localRangeBound("2026-11-01T02:00", NY, "end")!.toISOString()).toBe("2026-11-01T07:00:00.000Z");
  });

  it("reads a time skipped in spring as the moment of the change, at either end, and refuses an impossible date", () => {
    // 02:00–03:00 EST on 8 Mar 2026 never happened: 07:00Z is 03:00 EDT.
    expect(localRangeBound("2026-03-08T02:30", NY, "start")!.toISOString()).toBe("2026-03-08T07:00:00.000Z");
    expect(localRangeBound("2026-03-08T02:30", NY, "end")!.toISOString()).toBe("2026-03-08T07:00:00.000Z");
    expect(localRangeBound("2026-03-08T01:59", NY, "end")!.toISOString()).toBe("2026-03-08T06:59:00.000Z");
    expect(localRangeBound("2026-02-30T10:00", NY, "start")).toBeNull();
    expect(localRangeBound("2026-11-01 01:30", NY, "start")).toBeNull();
  });
});
