// tsx tests/support/seed-review-night.ts [--beds 4W-01,4W-02,…]
// Tests only (npm test runs it on the e2e database): gives a few demo beds their simulated beats from the evening of
// the last completed review night until now — the records the device simulator sends — through the ingest's own
// BeatWriter,
// then one compute run, so the review screens have a real night of windows, baselines and flags to show. Beat times
// are the simulator's true times (the running ingest estimates them from the device clock instead).
import { parseArgs } from "node:util";
import { runCompute } from "@/lib/compute/run";
import { db } from "@/lib/db/knex";
import { BeatWriter, type DeviceCounters } from "@/lib/ingest/beat-writer";
import { SimulatedDevice } from "@/lib/simulator/device";
import { loadSimulatedDevices } from "@/lib/simulator/load-devices";
import { nightBlockAt } from "@/lib/simulator/night";
import { lastCompletedNight } from "@/lib/review/night";

/** A healthy night, the rigid loss of complexity (raises flags), AF-like episodes and ectopy. */
const DEFAULT_BEDS = ["4W-01", "4W-02", "4W-03", "4W-05"];

const counters = (): DeviceCounters => ({
  lastSeq: 0, lastSeenAt: null, lastBeatAt: null, gaps: 0, missingSeqs: 0, duplicates: 0, malformed: 0, malformedByKind: {},
  reconnects: 0, clockOffsetMs: null, connected: false, leadOff: false, lastError: null,
});

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { beds: { type: "string" } }, strict: true });
  const beds = values.beds ? values.beds.split(",").map((b) => b.trim()).filter(Boolean) : DEFAULT_BEDS;
  const now = Date.now();
  const devices = (await loadSimulatedDevices(db)).filter((d) => beds.includes(d.bedLabel));
  if (devices.length !== beds.length) throw new Error(`not every bed of ${beds.join(", ")} has a device assigned`);
  const ids = new Map((await db("devices").whereIn("serial", devices.map((d) => d.serial)).select("id", "serial")).map((r) => [r.serial, r.id as string]));
  const units = new Map((await db("units").select("time_zone", "night_starts_at", "night_ends_at", "code")).map((u) => [u.code, u]));
  const state = new Map<string, DeviceCounters>();
  const writer = new BeatWriter(db, state, { batchSize: 50_000, flushIntervalMs: 3_600_000, maxBuffered: 10_000_000 });
  let beats = 0;
  for (const config of devices) {
    const deviceId = ids.get(config.serial)!;
    const c = counters();
    state.set(deviceId, c);
    const unit = units.get(config.bedLabel.split("-")[0]!)!;
    const night = lastCompletedNight(new Date(now), { timeZone: unit.time_zone, startsAt: unit.night_starts_at, endsAt: unit.night_ends_at });
    const device = new SimulatedDevice(config, true);
    // From the evening that night begins (the simulator's blocks start at 19:00 local), whatever the time of day.
    device.begin(nightBlockAt(night.from.getTime(), config.timeZone).startMs);
    device.advanceTo(now);
    const store = device.store;
    for (let seq = store.firstSeq; seq <= store.lastSeq; seq++) {
      const record = store.record(seq);
      const tTrue = store.truth(seq).tTrue;
      c.lastSeq = seq;
      if (record.kind === "beat") {
        c.lastBeatAt = tTrue;
        beats++;
      }
      writer.add({ deviceId, record, beatAt: tTrue, receivedAt: tTrue });
    }
    await writer.flush();
  }
  await writer.stop();
  if (writer.buffered > 0 || writer.failures > 0) throw new Error(`${writer.buffered} records could not be written`);
  const run = await runCompute({ trigger: "test", db, now: new Date(now) });
  if (run.status !== "done") throw new Error(`compute run ${run.runId} ${run.status}: ${run.error}`);
  console.log(JSON.stringify({ beds, beats, windows: run.windows, flagsRaised: run.flagsRaised, ms: run.durationMs }));
}

main()
  .then(() => db.destroy())
  .catch(async (err: unknown) => {
    console.error(`seed-review-night: ${err instanceof Error ? err.message : String(err)}`);
    await db.destroy();
    process.exit(1);
  });
