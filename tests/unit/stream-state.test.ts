// A device stream's state at the bounds of each rule. The 60-s bound for live data is DOMAIN §5.7 (stale after 60 s);
// lead-off status records arriving without beats are a device behaviour DOMAIN §6.7 names; OFFLINE_AFTER_MS and what
// counts as "heard" are our own rules, stated in lib/devices/stream-state.ts, so these tests pin them at their edges.
import { describe, expect, it } from "vitest";
import { LIVE_WITHIN_MS, OFFLINE_AFTER_MS, STREAM_STATE_LABELS, streamStateOf } from "@/lib/devices/stream-state";

const NOW = new Date("2025-06-10T12:00:30.000Z");
const ago = (ms: number) => new Date(NOW.getTime() - ms);
const MIN = 60_000;

/** A read device with nothing ever received, not connected, not lead-off; each test sets what it is about. */
const stream = (s: Partial<Parameters<typeof streamStateOf>[0]> = {}) =>
  streamStateOf({ streamed: true, connected: false, lastBeatAt: null, lastSeenAt: null, leadOff: false, ...s }, NOW);

describe("leads off (a device that is heard and says it has no patient signal)", () => {
  it("is leads off while connected and lead-off with no beat for 5 min (a monitor on an empty bed)", () => {
    expect(stream({ connected: true, leadOff: true, lastBeatAt: ago(5 * MIN), lastSeenAt: ago(20_000) })).toBe("leads_off");
    // Connected is enough: a beat never received and no record within LIVE_WITHIN_MS.
    expect(stream({ connected: true, leadOff: true, lastSeenAt: ago(LIVE_WITHIN_MS + 1) })).toBe("leads_off");
  });

  it("yields to live when a beat came within LIVE_WITHIN_MS, and takes over one millisecond later", () => {
    expect(stream({ connected: true, leadOff: true, lastBeatAt: ago(LIVE_WITHIN_MS), lastSeenAt: ago(0) })).toBe("live");
    expect(stream({ connected: true, leadOff: true, lastBeatAt: ago(LIVE_WITHIN_MS + 1), lastSeenAt: ago(0) })).toBe("leads_off");
  });

  it("when not connected, holds while the last record is at most LIVE_WITHIN_MS old, then reads stale", () => {
    expect(stream({ leadOff: true, lastSeenAt: ago(LIVE_WITHIN_MS) })).toBe("leads_off");
    expect(stream({ leadOff: true, lastSeenAt: ago(LIVE_WITHIN_MS + 1) })).toBe("stale");
  });

  it("is never reached when the device's last word was not lead-off", () => {
    expect(stream({ connected: true, leadOff: false, lastBeatAt: ago(5 * MIN), lastSeenAt: ago(20_000) })).toBe("stale");
    expect(stream({ connected: false, leadOff: false, lastSeenAt: ago(LIVE_WITHIN_MS) })).toBe("stale");
  });

  it("reads offline when the device has been silent for longer than OFFLINE_AFTER_MS and is not connected, lead-off or not", () => {
    expect(stream({ leadOff: true, lastSeenAt: ago(OFFLINE_AFTER_MS) })).toBe("stale");
    expect(stream({ leadOff: true, lastSeenAt: ago(OFFLINE_AFTER_MS + 1) })).toBe("offline");
    expect(stream({ leadOff: true, lastBeatAt: ago(OFFLINE_AFTER_MS + 1), lastSeenAt: ago(OFFLINE_AFTER_MS + 1) })).toBe("offline");
  });

  it("is not_streaming when Corvane does not read the device, whatever it last said", () => {
    expect(stream({ streamed: false, connected: true, leadOff: true, lastSeenAt: ago(0) })).toBe("not_streaming");
  });

  it("is labelled in words", () => {
    expect(STREAM_STATE_LABELS.leads_off).toBe("Leads off");
  });
});

describe("live, stale and offline without lead-off", () => {
  it("is live up to LIVE_WITHIN_MS after the last beat and stale after it", () => {
    expect(stream({ lastBeatAt: ago(LIVE_WITHIN_MS), lastSeenAt: ago(LIVE_WITHIN_MS) })).toBe("live");
    expect(stream({ lastBeatAt: ago(LIVE_WITHIN_MS + 1), lastSeenAt: ago(LIVE_WITHIN_MS + 1) })).toBe("stale");
  });

  it("counts silence from the last beat where no record time is stored, as before last_seen_at was read", () => {
    expect(stream({ lastBeatAt: ago(OFFLINE_AFTER_MS) })).toBe("stale");
    expect(stream({ lastBeatAt: ago(OFFLINE_AFTER_MS + 1) })).toBe("offline");
    expect(stream({ connected: true, lastBeatAt: ago(OFFLINE_AFTER_MS + 1) })).toBe("stale");
    expect(stream()).toBe("offline");
  });

  it("counts silence from the last record of any kind: a status record 5 min ago keeps an old beat from reading offline", () => {
    expect(stream({ lastBeatAt: ago(120 * MIN), lastSeenAt: ago(5 * MIN) })).toBe("stale");
  });
});
