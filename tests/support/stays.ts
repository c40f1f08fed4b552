// Test fixtures for the compute and flag tests: a stay in a new bed with a device assigned from an hour before
// admission, and simulated beats stored as the ingest would store them.
import type { Knex } from "knex";
import type { SimulatedBeats } from "@/lib/engine/simulate";

const HOUR = 3_600_000;
let beds = 0;

export async function makeTestStay(db: Knex, unitId: string, admittedAt: Date, dischargedAt: Date) {
  beds += 1;
  const label = `T-${beds}`;
  const [bed] = await db("beds").insert({ unit_id: unitId, label, sort_order: 100 + beds, active: true }).returning("id");
  const [patient] = await db("patients").insert({ record_number: `TEST-${beds}`, display_name: "Test, Synthetic", birth_date: null }).returning("id");
  const [stay] = await db("stays").insert({ patient_id: patient!.id, bed_id: bed!.id, admitted_at: admittedAt, discharged_at: dischargedAt }).returning("id");
  const [device] = await db("devices")
    .insert({ serial: `TEST-${beds}`, unit_id: unitId, model: "test monitor", firmware: "0", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/unused", stream_token_hash: "unused", stream_token_enc: "unused" })
    .returning("id");
  await db("device_assignments").insert({ device_id: device!.id, bed_id: bed!.id, assigned_from: new Date(admittedAt.getTime() - HOUR), assigned_to: null, assigned_by: null });
  return { stayId: stay!.id as string, deviceId: device!.id as string };
}

/** Stores simulated beats (times in epoch s) for a device, as the ingest would: ms timestamps, float4 quality. Returns
 *  the series exactly as the compute job reads it back. `from` continues a device's sequence numbers. */
export async function insertTestBeats(db: Knex, deviceId: string, sim: SimulatedBeats, from = 0, to = sim.rr.length) {
  const days = new Set<string>();
  const rows = [];
  for (let k = from; k < to; k++) {
    const at = new Date(Math.round(sim.times[k]! * 1000));
    days.add(at.toISOString().slice(0, 10));
    rows.push({ device_id: deviceId, seq: k + 1, beat_at: at, device_time: at, rr_ms: sim.rr[k]!, beat_type: sim.beatType[k]!, quality: sim.quality[k]!, lead_off: sim.leadOff[k] === 1 });
  }
  for (const day of days) await db.raw("SELECT ensure_beats_partition(?::date)", [day]);
  for (let i = 0; i < rows.length; i += 5000) await db("beats").insert(rows.slice(i, i + 5000));
  return {
    rr: Float64Array.from(rows, (r) => r.rr_ms),
    times: Float64Array.from(rows, (r) => r.beat_at.getTime() / 1000),
    quality: Float64Array.from(rows, (r) => Math.fround(r.quality)),
    leadOff: Uint8Array.from(rows, (r) => (r.lead_off ? 1 : 0)),
  };
}
