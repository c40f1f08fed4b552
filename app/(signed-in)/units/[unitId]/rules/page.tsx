import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { documentToFields } from "@/lib/rules/rules-form.validation";
import { unitRuleSets } from "@/lib/rules/store";
import { formatLocal } from "@/lib/time";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { RuleSetForm } from "@/components/rules/RuleSetForm";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Rule sets" };

export default async function RuleSetsPage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  const actor = await guardPage("rules.manage", unitId.data);
  const sets = await unitRuleSets(unitId.data);
  if (!sets) notFound();
  await auditAs(actor, { action: "rule_set.view", permission: "rules.manage", unitId: unitId.data, target: { type: "unit", id: unitId.data } });
  const [inForce] = sets.versions;
  const tz = sets.unit.timeZone;
  return (
    <div className="space-y-5">
      <PageHeader eyebrow="Rule sets" title={sets.unit.name} />
      <DecisionSupportCaution />
      <p className="text-sm text-muted">
        Rule sets are a local protocol decision for the unit&apos;s clinical leads. They raise review flags — prompts to
        look at a trend — never alarms. Research-only indices can never drive a flag and are not offered.
      </p>
      <section aria-labelledby="in-force" className="rounded-md border border-line bg-panel p-4">
        <h2 id="in-force">In force</h2>
        {inForce ? (
          <p>
            Version {inForce.version}: {inForce.name}
            {inForce.isDefault && <strong> (default — for local protocol to set)</strong>}, saved {formatLocal(inForce.savedAt, tz)}
            {inForce.savedBy ? ` by ${inForce.savedBy}` : " by the system seed"}.
          </p>
        ) : (
          <p>No rule set yet: this unit raises no flags.</p>
        )}
      </section>
      <RuleSetForm
        unitId={sets.unit.id}
        timeZone={tz}
        basedOnVersion={inForce?.version ?? 0}
        initial={inForce?.document ? documentToFields(inForce.document) : { maxFlagsPerNight: "6", nightStartsAt: "12:00", rules: [] }}
      />
      <section aria-labelledby="history">
        <h2 id="history">History</h2>
        <ol className="space-y-2">
          {sets.versions.map((v) => (
            <li key={v.id} className="rounded-md border border-line p-3">
              <p>
                <strong>Version {v.version}</strong> — {v.name}
                {v.isDefault ? " (default)" : ""} · {formatLocal(v.savedAt, tz)} · {v.savedBy ?? "system seed"}
                {v.document ? ` · ${v.document.rules.length} rule${v.document.rules.length === 1 ? "" : "s"}, at most ${v.document.maxFlagsPerNight} flags per patient per night` : " · no longer valid (not used for flags)"}
              </p>
              {v.note && <p className="text-sm text-muted">{v.note}</p>}
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
