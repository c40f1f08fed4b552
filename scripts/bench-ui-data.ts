// Benchmark data for `npm run bench:ui` (never for the demo or the tests): an invented unit "BENCH" of 48 beds, each
// with a stay admitted 7 days ago and 7 days of stored windows (a 5-min window every minute, an hour window every
// hour), baselines, a few flags and a device with a recent beat — the volume the review route handlers must serve
// fast. Window values are smooth synthetic curves written straight into index_windows (the engine is not what this
// benchmark measures). Prints the ids the benchmark needs as one JSON line.
import { computationParams, storeComputationParams } from "@/lib/compute/params";
import { hashPassword } from "@/lib/auth/password";
import { db } from "@/lib/db/knex";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { DEFAULT_RULE_SET } from "@/seeds/02_rule_sets";

export const BENCH_BEDS = 48;
export const BENCH_DAYS = 7;
export const BENCH_EMAIL = "bench.clinician@larkspur.example";
export const BENCH_PASSWORD = "bench-only-password";

async function main(): Promise<void> {
  const now = new Date();
  const admitted = new Date(Math.floor(now.getTime() / 3_600_000) * 3_600_000 - BENCH_DAYS * 86_400_000);
  const params = computationParams("adult");
  await storeComputationParams(db, params);
  const out = await db.transaction(async (trx) => {
    const [unit] = await trx("units").insert({ code: "BENCH", name: "Bench Unit (invented)", kind: "adult", time_zone: "America/New_York" }).returning("id");
    const unitId = unit!.id as string;
    const [ruleSet] = await trx("rule_sets")
      .insert({ unit_id: unitId, version: 1, name: "Bench rules", rules: JSON.stringify(DEFAULT_RULE_SET) as unknown as object, created_by: null })
      .returning("id");
    const [user] = await trx("users").insert({ email: BENCH_EMAIL, name: "Bench Clinician (invented)", password_hash: await hashPassword(BENCH_PASSWORD) }).returning("id");
    await trx("user_unit_roles").insert({ user_id: user!.id, unit_id: unitId, role: "clinician", granted_by: null });
    const stayIds: string[] = [];
    for (let b = 1; b <= BENCH_BEDS; b++) {
      const label = `B-${String(b).padStart(2, "0")}`;
      const [bed] = await trx("beds").insert({ unit_id: unitId, label, sort_order: b, active: true }).returning("id");
      const [patient] = await trx("patients").insert({ record_number: `BENCH-${b}`, display_name: `Bench Patient ${b} (invented)`, birth_date: null }).returning("id");
      const [stay] = await trx("stays").insert({ patient_id: patient!.id, bed_id: bed!.id, admitted_at: admitted, discharged_at: null }).returning("id");
      const [device] = await trx("devices")
        .insert({ serial: `BENCH-DEV-${b}`, unit_id: unitId, model: "bench monitor", firmware: "0", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/unused", stream_token_hash: `unused-${b}`, stream_token_enc: "unused" })
        .returning("id");
      await trx("device_assignments").insert({ device_id: device!.id, bed_id: bed!.id, assigned_from: admitted, assigned_to: null, assigned_by: null });
      await trx("device_stream_status").insert({ device_id: device!.id, connected: true, last_seq: "1", last_seen_at: now, last_beat_at: now, gaps: 0, missing_seqs: "0", duplicates: 0, malformed: 0, malformed_by_kind: {}, reconnects: 0, clock_offset_ms: 0, lead_off: false, last_error: null, updated_at: now });
      stayIds.push(stay!.id as string);
    }
    // One statement per stay: 10,080 short windows and 168 long ones, values following a slow daily rhythm with a
    // little per-minute wobble; every 97th window unusable (values null), as real nights have some.
    for (const [k, stayId] of stayIds.entries()) {
      await trx.raw(
        `INSERT INTO index_windows (stay_id, kind, window_start, window_end, algorithm_version, params_hash, grade, quality, values, reasons, baseline_delta)
         SELECT ?, 'short', s, s + interval '5 minutes', ?, ?, g, jsonb_build_object('coverage', 0.99, 'grade', g, 'nBeats', 330, 'shareEdited', 0.01, 'shareEctopic', 0.005, 'longestGapS', 1.2, 'reasons', '[]'::jsonb),
                CASE WHEN g = 'unusable' THEN NULL ELSE jsonb_build_object(
                  'hr', 66 + 6 * sin(i / 229.0 + ?) , 'sdnn', 42 + 9 * sin(i / 311.0 + ?), 'rmssd', 31 + 7 * sin(i / 277.0),
                  'lf_hf', 1.6 + 0.5 * sin(i / 199.0), 'sampen', 1.5 + 0.3 * sin(i / 401.0), 'dfa_alpha1', 1.05 + 0.2 * sin(i / 157.0 + ?)) END,
                '{}'::jsonb,
                CASE WHEN g = 'unusable' THEN NULL ELSE jsonb_build_object('hr', 6 * sin(i / 229.0 + ?), 'sdnn', 9 * sin(i / 311.0 + ?), 'rmssd', 7 * sin(i / 277.0), 'sampen', 0.3 * sin(i / 401.0), 'dfa_alpha1', 0.2 * sin(i / 157.0 + ?)) END
         FROM (SELECT i, ?::timestamptz + i * interval '1 minute' AS s, CASE WHEN i % 97 = 0 THEN 'unusable' ELSE 'good' END AS g
               FROM generate_series(0, ?) AS i) w`,
        [stayId, ALGORITHM_VERSION, params.hash, k, k, k, k, k, k, admitted, BENCH_DAYS * 1440 - 6],
      );
      await trx.raw(
        `INSERT INTO index_windows (stay_id, kind, window_start, window_end, algorithm_version, params_hash, grade, quality, values, reasons, mse, baseline_delta)
         SELECT ?, 'long', s, s + interval '1 hour', ?, ?, 'good', '{"coverage":0.99,"grade":"good"}'::jsonb,
                jsonb_build_object('mse_ci', 14 + 2 * sin(i / 9.0), 'dfa_alpha2', 1.1 + 0.1 * sin(i / 7.0), 'apen', 1.1, 'mse_slope_short', 0.02, 'mse_slope_long', 0.001, 'mfdfa_width', 0.4),
                '{}'::jsonb, '[1.2,1.3,1.35,1.4,1.42,1.44,1.45,1.46,1.47,1.48]'::jsonb, jsonb_build_object('mse_ci', 2 * sin(i / 9.0), 'dfa_alpha2', 0.1 * sin(i / 7.0))
         FROM (SELECT i, ?::timestamptz + i * interval '1 hour' AS s FROM generate_series(0, ?) AS i) w`,
        [stayId, ALGORITHM_VERSION, params.hash, admitted, BENCH_DAYS * 24 - 2],
      );
      const baselines = { hr: [66, 4], sdnn: [42, 6], rmssd: [31, 5], lf_hf: [1.6, 0.3], sampen: [1.5, 0.2], dfa_alpha1: [1.05, 0.12], mse_ci: [14, 1.5], dfa_alpha2: [1.1, 0.08] };
      await trx("baselines").insert(
        Object.entries(baselines).map(([index_key, [median, spread]]) => ({
          stay_id: stayId, index_key, algorithm_version: ALGORITHM_VERSION, median: median!, spread: spread!, n_windows: 360,
          from_at: admitted, to_at: new Date(admitted.getTime() + 6 * 3_600_000),
        })),
      );
      if (k % 4 === 0) {
        const from = new Date(now.getTime() - (5 + (k % 7)) * 3_600_000);
        await trx("flags").insert({
          stay_id: stayId, unit_id: unitId, rule_set_id: ruleSet!.id, rule_set_version: 1, rule_id: "alpha1-below-baseline", severity: "review",
          condition_from: from, condition_to: new Date(from.getTime() + 40 * 60_000),
          details: { rule: { id: "alpha1-below-baseline", label: "DFA α1 below the patient's baseline (bench)", index: "dfa_alpha1" } },
        });
      }
    }
    return { unitId, stayIds };
  });
  // What autovacuum does soon after a bulk insert (it also sets the visibility map that index-only scans use).
  await db.raw("VACUUM ANALYZE");
  console.log(JSON.stringify({ ...out, email: BENCH_EMAIL, password: BENCH_PASSWORD }));
}

main()
  .then(() => db.destroy())
  .catch(async (err: unknown) => {
    console.error(`bench-ui-data: ${err instanceof Error ? err.message : String(err)}`);
    await db.destroy();
    process.exit(1);
  });
