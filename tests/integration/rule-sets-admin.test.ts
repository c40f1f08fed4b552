// Rule sets (admin) on real PostgreSQL: the preview of a draft on the last completed night against the flags the
// compute job actually raises with that version once saved, on the same beats; the preview writes nothing; saving
// adds a version and keeps the old one; refusals come back as field errors and write nothing; the form round-trips
// the seeded DEFAULT rule set. The server actions run for real; only Next's request plumbing is replaced (the
// session, the request headers, cache revalidation), and the app's one Knex instance is this scratch database.
import type { Knex } from "knex";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { scratchDatabase } from "@/tests/support/db";

const session = vi.hoisted(() => ({ current: null as null | { user: { id: string } } }));
vi.mock("next-auth", async (orig) => ({ ...(await orig<object>()), getServerSession: async () => session.current }));
vi.mock("next/headers", () => ({ headers: async () => new Headers({ "x-request-id": "req-rules-test", "x-forwarded-for": "192.0.2.9" }) }));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

// lib/db/knex.ts reuses globalThis.corvaneDb: set it before anything imports that module.
const scratch = await scratchDatabase();
const db: Knex = scratch.db;
(globalThis as unknown as { corvaneDb?: Knex }).corvaneDb = db;
const { runCompute } = await import("@/lib/compute/run");
const { simulateComplexityLoss } = await import("@/lib/engine/simulate");
const { previewRuleSetOn } = await import("@/lib/rules/preview");
const { saveRuleSetChange } = await import("@/lib/rules/store");
const { documentToFields, fieldsToFormEntries, ruleSetSaveSchema } = await import("@/lib/rules/rules-form.validation");
const { previewRuleSet, saveRuleSet } = await import("@/lib/rules/actions");
const { seed } = await import("@/seeds/01_demo");
const { DEFAULT_RULE_SET, seedRuleSets } = await import("@/seeds/02_rule_sets");
const { demoPerson } = await import("@/seeds/demo-data");
const { insertTestBeats, makeTestStay } = await import("@/tests/support/stays");
type RuleSetDocument = import("@/lib/flags/rules.validation").RuleSetDocument;
type SimulatedBeats = import("@/lib/engine/simulate").SimulatedBeats;

const HOUR = 3_600_000;
// The night of 1 June 2025 in New York (EDT): 22:00 → 06:00 is 02:00Z → 10:00Z on 2 June.
const NIGHT_FROM = new Date("2025-06-02T02:00:00Z");
const NOW = new Date("2025-06-02T11:00:00Z");
// Admitted at 21:00 EDT: the first hour (before the night) is the baseline; the drift ramps from 22:30 to 00:00 EDT.
const ADMITTED = new Date("2025-06-02T01:00:00Z");
const DISCHARGED = new Date(ADMITTED.getTime() + 5 * HOUR);
const BASELINE = { hours: 1, minWindows: 30 };

let unit: string;
let adminId: string;
const sims: SimulatedBeats[] = [];

const count = async (table: string, where: Record<string, unknown> = {}) => Number((await db(table).where(where).count<{ n: string }[]>("* as n"))[0]!.n);
const form = (fields: Record<string, string>) => {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  return fd;
};
const auditSystem = { actor: { userId: null, email: null, role: "system" }, requestId: "rules-test", clientAddress: null };

/** Stays in the unit with the chosen beats (the same simulated series each time: identical data). */
async function staysWithBeats(): Promise<string[]> {
  const ids: string[] = [];
  for (const sim of sims) {
    const s = await makeTestStay(db, unit, ADMITTED, DISCHARGED);
    await insertTestBeats(db, s.deviceId, sim);
    ids.push(s.stayId);
  }
  return ids;
}

const flagsOf = (stayIds: string[]) =>
  db("flags as f").join("stays as s", "s.id", "f.stay_id").join("beds as b", "b.id", "s.bed_id").whereIn("f.stay_id", stayIds).select("f.rule_id", "f.severity", "f.condition_from", "f.condition_to", "f.rule_set_version");

/** Flags as comparable rows: rule, severity and the condition's times (beds differ between the twin stays). */
const shape = (rows: { ruleId: string; severity: string; conditionFrom: string; conditionTo: string | null }[]) =>
  rows.map((r) => `${r.ruleId}|${r.severity}|${r.conditionFrom}|${r.conditionTo ?? "-"}`).sort();

/** DEFAULT with the baseline thresholds moved: `alpha` below-baseline amount, `sdnnPercent` of baseline. */
const variant = (alpha: number, sdnnPercent: number): RuleSetDocument => ({
  ...DEFAULT_RULE_SET,
  rules: DEFAULT_RULE_SET.rules.map((r) =>
    r.kind === "index" && r.index === "dfa_alpha1"
      ? { ...r, comparison: { type: "below_baseline_minus" as const, amount: alpha } }
      : r.kind === "index" && r.index === "sdnn"
        ? { ...r, comparison: { type: "below_baseline_percent" as const, percent: sdnnPercent } }
        : r,
  ),
});
const STRICTER = variant(0.15, 75);
const LOOSER = variant(0.45, 25);

beforeAll(async () => {
  await seed(db);
  const [u] = await db("units").insert({ code: "RS", name: "Rule set test unit", kind: "adult", time_zone: "America/New_York" }).returning("id");
  unit = u!.id;
  await seedRuleSets(db);
  adminId = (await db("users").where({ email: demoPerson("admin").email }).first("id"))!.id;
  await db("user_unit_roles").insert({ user_id: adminId, unit_id: unit, role: "admin", granted_by: null });
  // Loss of complexity, rigid and decorrelated (DOMAIN §6.2), shortened as in tests/integration/flags.test.ts.
  const ramp = { rampStartS: 5400, rampDurationS: 5400, durationS: 5 * 3600 - 60, startS: ADMITTED.getTime() / 1000 };
  sims.push(simulateComplexityLoss({ seed: 91, ...ramp, betaEnd: 2 }), simulateComplexityLoss({ seed: 92, ...ramp, betaEnd: 0 }));
}, 300_000);
beforeEach(() => {
  session.current = null;
});
afterAll(async () => {
  await scratch.cleanup();
});

describe("preview against the flags actually raised", () => {
  let originals: string[];
  let strict: Awaited<ReturnType<typeof previewRuleSetOn>>;
  let loose: Awaited<ReturnType<typeof previewRuleSetOn>>;

  it("counts, for the version in force, exactly the flags the compute job recorded on that night (source: issue 6 item 6)", async () => {
    originals = await staysWithBeats();
    const run = await runCompute({ trigger: "test", db, now: NOW, baseline: BASELINE });
    expect(run.status).toBe("done");
    const recorded = await flagsOf(originals);
    expect(recorded.length).toBeGreaterThan(0);
    const inForce = await previewRuleSetOn(unit, DEFAULT_RULE_SET, NOW, db);
    expect(inForce!.night).toMatchObject({ night: "2025-06-01", from: NIGHT_FROM.toISOString(), hours: 8 });
    expect(inForce!.stays).toBe(2);
    expect(inForce!.inForce).toEqual({ version: 1, count: recorded.length });
    expect(inForce!.draft.count).toBe(recorded.length);
  }, 300_000);

  it("writes nothing: flags, rule sets, baselines, windows, stays and audit unchanged (source: issue 6 item 5)", async () => {
    const tables = ["flags", "rule_sets", "baselines", "index_windows", "stays", "audit_events"];
    const before = await Promise.all(tables.map((t) => count(t)));
    strict = await previewRuleSetOn(unit, STRICTER, NOW, db);
    loose = await previewRuleSetOn(unit, LOOSER, NOW, db);
    expect(await Promise.all(tables.map((t) => count(t)))).toEqual(before);
    // A stricter threshold can only find more (or the same) conditions than a looser one on the same windows.
    expect(strict!.draft.count).toBeGreaterThan(loose!.draft.count);
  }, 300_000);

  it("equals, for a stricter and a looser draft, the flags the compute job raises with that version once saved, on the same beats (source: issue 6 item 6)", async () => {
    for (const [doc, preview] of [[STRICTER, strict], [LOOSER, loose]] as const) {
      const { saved } = await db.transaction((trx) => saveRuleSetChange(trx, { unitId: unit, document: doc, note: "test change", createdBy: adminId, audit: auditSystem }));
      const twins = await staysWithBeats();
      const run = await runCompute({ trigger: "test", db, now: NOW, baseline: BASELINE });
      expect(run.status).toBe("done");
      const raised = await flagsOf(twins);
      expect(raised.every((f) => f.rule_set_version === saved.version)).toBe(true);
      expect(raised.length).toBe(preview!.draft.count);
      expect(shape(raised.map((f) => ({ ruleId: f.rule_id, severity: f.severity, conditionFrom: f.condition_from.toISOString(), conditionTo: f.condition_to?.toISOString() ?? null })))).toEqual(
        shape(preview!.draft.flags),
      );
    }
  }, 600_000);
});

describe("saving through the server action", () => {
  const entries = (doc: RuleSetDocument, basedOn: number, note = "Tighter α1 after the unit's review") => ({
    ...fieldsToFormEntries(unit, documentToFields(doc), note),
    basedOnVersion: String(basedOn),
  });
  const latestVersion = async () => (await db("rule_sets").where({ unit_id: unit }).max<{ v: number }>("version as v").first())!.v;

  it("makes version N+1, keeps N, and audits before/after with what changed (source: issue 6 item 5)", async () => {
    session.current = { user: { id: adminId } };
    const n = await latestVersion();
    const changed = { ...DEFAULT_RULE_SET, maxFlagsPerNight: 4 };
    const res = await saveRuleSet(null, form(entries(changed, n)));
    expect(res).toMatchObject({ ok: true, data: { version: n + 1 } });
    expect(await db("rule_sets").where({ unit_id: unit }).orderBy("version").pluck("version")).toEqual(Array.from({ length: n + 1 }, (_, i) => i + 1));
    const saved = await db("rule_sets").where({ unit_id: unit, version: n + 1 }).first();
    expect(saved).toMatchObject({ is_default: false, created_by: adminId, note: "Tighter α1 after the unit's review", rules: changed });
    const audit = await db("audit_events").where({ action: "rule_set.change" }).orderBy("seq", "desc").first();
    expect(audit).toMatchObject({ actor_user_id: adminId, unit_id: unit });
    expect(audit!.detail).toMatchObject({ before: { version: n }, after: { version: n + 1 }, maxFlagsPerNight: { before: DEFAULT_RULE_SET.maxFlagsPerNight, after: 4 } });
    // A form edited from version N is now stale: a second save is refused, nothing written.
    const again = await saveRuleSet(null, form(entries(changed, n)));
    expect(again).toMatchObject({ ok: false, code: "conflict" });
    expect(await latestVersion()).toBe(n + 1);
  });

  it("refuses a research-only index, an out-of-range threshold and an empty rule list with field errors, writing nothing (source: DOMAIN §5.6; lib/flags/rules.validation.ts)", async () => {
    session.current = { user: { id: adminId } };
    const n = await latestVersion();
    const rows = () => Promise.all(["rule_sets", "audit_events", "flags"].map((t) => count(t)));
    const before = await rows();
    const base = entries(DEFAULT_RULE_SET, n);
    const research = await saveRuleSet(null, form({ ...base, "rules.0.index": "lyapunov" }));
    expect(research).toMatchObject({ ok: false, code: "invalid_input" });
    expect(research.ok ? [] : research.fieldErrors!["rules.0.index"]).toEqual([expect.stringMatching(/research-only/)]);
    // "Below 150 % of baseline" is not below the baseline at all.
    const outOfRange = await saveRuleSet(null, form({ ...base, "rules.1.value": "150" }));
    expect(outOfRange.ok ? [] : outOfRange.fieldErrors!["rules.1.value"]).toEqual([expect.stringMatching(/under 100/)]);
    const coverage = await saveRuleSet(null, form({ ...base, "rules.2.value": "1.5" }));
    expect(coverage.ok ? {} : coverage.fieldErrors).toHaveProperty(["rules.2.value"]);
    const empty = Object.fromEntries(Object.entries(base).filter(([k]) => !k.startsWith("rules.")));
    const none = await saveRuleSet(null, form(empty));
    expect(none.ok ? [] : none.fieldErrors!.rules).toEqual([expect.stringMatching(/at least one rule/)]);
    const noNote = await saveRuleSet(null, form({ ...base, note: " " }));
    expect(noNote.ok ? {} : noNote.fieldErrors).toHaveProperty(["note"]);
    // Invalid input is refused before the handler: no rule set, no audit entry, no flag.
    expect(await rows()).toEqual(before);
  });

  it("refuses a caller who is not an administrator of the unit, writing only the refusal (source: lib/auth/roles.ts)", async () => {
    const clinician = (await db("users").where({ email: demoPerson("clinician").email }).first("id"))!.id;
    session.current = { user: { id: clinician } };
    const n = await latestVersion();
    expect(await previewRuleSet(null, form(entries(DEFAULT_RULE_SET, n)))).toMatchObject({ ok: false, code: "forbidden" });
    expect(await saveRuleSet(null, form(entries(DEFAULT_RULE_SET, n)))).toMatchObject({ ok: false, code: "forbidden" });
    expect(await latestVersion()).toBe(n);
  });

  it("previews through the action with the same numbers as the service, audited as a read (source: issue 6 item 5)", async () => {
    session.current = { user: { id: adminId } };
    const n = await latestVersion();
    const res = await previewRuleSet(null, form(entries(STRICTER, n)));
    expect(res.ok).toBe(true);
    const direct = await previewRuleSetOn(unit, STRICTER, new Date(), db);
    expect(res.ok && res.data).toEqual(direct);
    expect(await db("audit_events").where({ action: "rule_set.preview" }).orderBy("seq", "desc").first()).toMatchObject({ actor_user_id: adminId, unit_id: unit });
  });
});

describe("the form schema", () => {
  it("round-trips the seeded DEFAULT rule set (source: seeds/02_rule_sets.ts)", () => {
    const parsed = ruleSetSaveSchema.safeParse(fieldsToFormEntries("6f1c2a4e-8d3b-4c5a-9e7f-0a1b2c3d4e5f", documentToFields(DEFAULT_RULE_SET), "no change"));
    expect(parsed.success && parsed.data.document).toEqual(DEFAULT_RULE_SET);
  });
});
