// Which devices the simulator plays: every device with an open assignment to a bed, read from PostgreSQL once at
// start. Each gets its bed's demo scenario (seeds/demo-data.ts), its unit's time zone and review night (a backfill
// starts on the evening of the last night that has ended, so a full night is there at any hour), and the stays of its bed: a
// device streams beats only while a patient is on the bed (an empty bed's monitor reports leads off); neonatal beds
// always stream a neonatal scenario.
import type { Knex } from "knex";
import { decryptStreamToken, tokenMatches } from "@/lib/devices/stream-token";
import type { UnitKind } from "@/lib/db/tables";
import { DEMO_BED_SCENARIOS, type DemoScenario } from "@/seeds/demo-data";
import type { Occupancy, SimulatedDeviceConfig } from "./device";
import { NEONATAL_SCENARIOS } from "./scenarios";

/** A bed's scenario: its demo listing, else healthy sleep; a neonatal bed streams "nicu" unless listed as a
 *  neonatal scenario (the adult recipes are not neonatal physiology). */
export function scenarioForBed(bedLabel: string, unitKind: UnitKind): DemoScenario {
  const listed: DemoScenario | undefined = DEMO_BED_SCENARIOS[bedLabel];
  if (unitKind === "neonatal") return listed && NEONATAL_SCENARIOS.includes(listed) ? listed : "nicu";
  return listed ?? "healthy_sleep";
}

interface Row {
  bed_id: string;
  serial: string;
  stream_token_enc: string;
  stream_token_hash: string;
  timestamp_resolution_ms: number;
  stream_url: string;
  bed_label: string;
  unit_kind: UnitKind;
  time_zone: string;
  night_starts_at: string;
  night_ends_at: string;
}

export interface LoadedDevice extends SimulatedDeviceConfig {
  bedLabel: string;
  /** Where the registry says this device serves its stream (to compare with the simulator's port). */
  streamUrl: string;
}

/**
 * The current stream token of each of `serials` that has one, unsealed (NEXTAUTH_SECRET, or `secret`), with the hash
 * it was read with, so a caller polling for issued or rotated tokens unseals only the ones that changed (`known`:
 * serial → hash already in use). A token that cannot be unsealed or does not match its hash is left out and named in
 * `errors`.
 */
export async function changedStreamTokens(
  db: Knex,
  known: ReadonlyMap<string, string>,
  secret?: string,
): Promise<{ tokens: Map<string, { token: string; hash: string }>; errors: string[] }> {
  const rows: { serial: string; stream_token_enc: string; stream_token_hash: string }[] = await db("devices")
    .whereIn("serial", [...known.keys()])
    .whereNotNull("stream_token_enc")
    .whereNotNull("stream_token_hash")
    .select("serial", "stream_token_enc", "stream_token_hash");
  const tokens = new Map<string, { token: string; hash: string }>();
  const errors: string[] = [];
  for (const row of rows) {
    if (known.get(row.serial) === row.stream_token_hash) continue;
    try {
      const token = decryptStreamToken(row.stream_token_enc, secret);
      if (!tokenMatches(token, row.stream_token_hash)) throw new Error("the sealed stream token does not match its stored hash");
      tokens.set(row.serial, { token, hash: row.stream_token_hash });
    } catch (err) {
      errors.push(`device ${row.serial}: ${(err as Error).message}`);
    }
  }
  return { tokens, errors };
}

/**
 * Devices with an open bed assignment, ordered by serial, with their stream tokens unsealed (NEXTAUTH_SECRET, or
 * `secret`). Throws, naming the device, when a token cannot be unsealed or does not match its stored hash.
 */
export async function loadSimulatedDevices(db: Knex, secret?: string): Promise<LoadedDevice[]> {
  const rows: Row[] = await db("devices as d")
    .join("device_assignments as a", "a.device_id", "d.id")
    .join("beds as b", "b.id", "a.bed_id")
    .join("units as u", "u.id", "b.unit_id")
    .whereNull("a.assigned_to")
    // Only devices Corvane reads: in service and holding a current token (none after a revoke or before the first issue).
    .where("d.status", "active")
    .whereNotNull("d.stream_token_enc")
    .select(
      "b.id as bed_id",
      "d.serial",
      "d.stream_token_enc",
      "d.stream_token_hash",
      "d.timestamp_resolution_ms",
      "d.stream_url",
      "b.label as bed_label",
      "u.kind as unit_kind",
      "u.time_zone",
      "u.night_starts_at",
      "u.night_ends_at",
    )
    .orderBy("d.serial");
  const stays = await db("stays")
    .whereIn("bed_id", [...new Set(rows.map((r) => r.bed_id))])
    .orderBy("admitted_at")
    .select<{ bed_id: string; admitted_at: Date; discharged_at: Date | null }[]>("bed_id", "admitted_at", "discharged_at");
  const occupied = new Map<string, Occupancy[]>();
  for (const s of stays) {
    const list = occupied.get(s.bed_id) ?? [];
    list.push({ fromMs: s.admitted_at.getTime(), toMs: s.discharged_at?.getTime() ?? null });
    occupied.set(s.bed_id, list);
  }
  return rows.map((row) => {
    let token: string;
    try {
      token = decryptStreamToken(row.stream_token_enc, secret);
    } catch (err) {
      throw new Error(
        `device ${row.serial}: its stream token cannot be unsealed (${(err as Error).message}); was the database seeded with another NEXTAUTH_SECRET?`,
      );
    }
    if (!tokenMatches(token, row.stream_token_hash)) throw new Error(`device ${row.serial}: the sealed stream token does not match its stored hash`);
    return {
      serial: row.serial,
      token,
      scenario: scenarioForBed(row.bed_label, row.unit_kind),
      timeZone: row.time_zone,
      resolutionMs: Number(row.timestamp_resolution_ms),
      occupied: occupied.get(row.bed_id) ?? [],
      night: { startsAt: row.night_starts_at, endsAt: row.night_ends_at },
      bedLabel: row.bed_label,
      streamUrl: row.stream_url,
    };
  });
}
