"use client";
// The Rule sets edit form: one fieldset per rule, add/remove, the per-night cap, "Preview on last night" and
// "Save as version N+1" with a required change note. Inputs are uncontrolled, so typed values stay in place when
// the server answers with field errors (components/useActionForm.ts).
import { explanationOf } from "@/lib/review/index-explanations";
import { useState, type FormEvent } from "react";
import { formatInTimeZone } from "date-fns-tz";
import { previewRuleSet, saveRuleSet } from "@/lib/rules/actions";
import type { RuleSetPreviewDTO } from "@/lib/rules/preview";
import { FLAGGABLE_INDEX_KEYS } from "@/lib/flags/rules.validation";
import { COVERAGE_CHOICE, type RuleFields, type RuleSetFields } from "@/lib/rules/rules-form.validation";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

const NEW_RULE: RuleFields = {
  id: "", label: "", index: "sdnn", comparator: "below", threshold: "baseline_percent", value: "50",
  durationUnit: "minutes", durationValue: "15", hysteresisMargin: "10", clearWindows: "5", severity: "watch",
};

let nextKey = 0;
const keyed = (r: RuleFields) => ({ key: `r${nextKey++}`, fields: r });

export function RuleSetForm({ unitId, timeZone, basedOnVersion, initial }: { unitId: string; timeZone: string; basedOnVersion: number; initial: RuleSetFields }) {
  const [rules, setRules] = useState(() => initial.rules.map(keyed));
  const preview = useActionForm(previewRuleSet);
  const save = useActionForm(saveRuleSet);
  const [last, setLast] = useState<"preview" | "save" | null>(null);
  const active = last === "save" ? save : preview;
  const errorsFor = (name: string) => active.errorsFor(name);

  const onSubmit = (e: FormEvent<HTMLFormElement>) => {
    const which = ((e.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null)?.value === "save" ? "save" : "preview";
    setLast(which);
    (which === "save" ? save : preview).onSubmit(e);
  };
  const onChange = (e: FormEvent<HTMLFormElement>) => {
    preview.onChange(e);
    save.onChange(e);
  };
  const p = preview.state?.ok ? (preview.state.data as RuleSetPreviewDTO | undefined) : undefined;
  const clock = (iso: string) => formatInTimeZone(iso, timeZone, "HH:mm zzz");

  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-4" noValidate>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="basedOnVersion" value={basedOnVersion} />
      <h2>Edit</h2>
      {active.state && !active.state.ok && <Notice tone="problem">{active.state.message}</Notice>}
      {last === "save" && save.state?.ok && <Notice tone="fine">{save.state.message}</Notice>}
      <FieldError id="rules-error" errors={errorsFor("rules")} />
      {rules.map(({ key, fields: r }, i) => (
        <RuleFieldset key={key} i={i} r={r} errorsFor={errorsFor} onRemove={() => setRules((rs) => rs.filter((x) => x.key !== key))} />
      ))}
      <button type="button" className="btn-secondary" onClick={() => setRules((rs) => [...rs, keyed(NEW_RULE)])}>Add a rule</button>
      <div className="grid max-w-2xl gap-4 sm:grid-cols-2">
        <Field name="maxFlagsPerNight" label="At most this many new flags per patient per night" defaultValue={initial.maxFlagsPerNight} errors={errorsFor("maxFlagsPerNight")} inputMode="numeric" />
        <Field name="nightStartsAt" label="The cap's night starts at (local HH:MM)" defaultValue={initial.nightStartsAt} errors={errorsFor("nightStartsAt")} />
      </div>
      <button type="submit" name="intent" value="preview" className="btn-secondary" disabled={preview.pending}>
        {preview.pending ? "Previewing…" : "Preview on last night"}
      </button>
      {p && (
        <section aria-live="polite" className="rounded-md border border-line bg-panel p-4">
          <p>
            This version would have raised <strong>{p.draft.count}</strong> flag{p.draft.count === 1 ? "" : "s"} on the night of {p.night.night} ({clock(p.night.from)} → {clock(p.night.to)}), over {p.stays} stay{p.stays === 1 ? "" : "s"}
            {p.inForce ? `; version ${p.inForce.version} in force would have raised ${p.inForce.count}.` : "."}
          </p>
          {p.draft.flags.length > 0 && (
            <table className="mt-2 text-sm">
              <caption className="sr-only">Flags this version would have raised</caption>
              <thead><tr><th scope="col">Bed</th><th scope="col">Rule</th><th scope="col">Severity</th><th scope="col">Condition</th></tr></thead>
              <tbody>
                {p.draft.flags.map((f, k) => (
                  <tr key={k}><td>{f.bedLabel}</td><td>{f.ruleLabel}</td><td>{f.severity}</td><td>{clock(f.conditionFrom)} → {f.conditionTo ? clock(f.conditionTo) : "end of night"}</td></tr>
                ))}
              </tbody>
            </table>
          )}
        </section>
      )}
      <div>
        <label htmlFor="note" className="block font-medium">Change note (required to save)</label>
        <textarea id="note" name="note" rows={2} className="field-input max-w-xl" aria-describedby="note-error" />
        <FieldError id="note-error" errors={errorsFor("note")} />
      </div>
      <button type="submit" name="intent" value="save" className="btn-primary" disabled={save.pending}>
        {save.pending ? "Saving…" : `Save as version ${basedOnVersion + 1}`}
      </button>
    </form>
  );
}

function Field({ name, label, defaultValue, errors, inputMode }: { name: string; label: string; defaultValue: string; errors?: string[]; inputMode?: "numeric" | "decimal" }) {
  const id = name.replace(/\./g, "-");
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-bold">{label}</label>
      <input id={id} name={name} defaultValue={defaultValue} inputMode={inputMode} className="field-input" aria-invalid={errors?.length ? true : undefined} aria-describedby={`${id}-error`} />
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}

function Select({ name, label, defaultValue, options, errors }: { name: string; label: string; defaultValue: string; options: [string, string][]; errors?: string[] }) {
  const id = name.replace(/\./g, "-");
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-bold">{label}</label>
      <select id={id} name={name} defaultValue={defaultValue} className="field-input" aria-describedby={`${id}-error`}>
        {options.map(([v, l]) => <option key={v} value={v}>{l}</option>)}
      </select>
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}

function RuleFieldset({ i, r, errorsFor, onRemove }: { i: number; r: RuleFields; errorsFor: (n: string) => string[] | undefined; onRemove: () => void }) {
  const n = (f: keyof RuleFields) => `rules.${i}.${f}`;
  return (
    <fieldset className="rounded-md border border-line p-4">
      <legend className="px-1 font-medium">Rule {i + 1}</legend>
      <input type="hidden" name={n("id")} value={r.id} />
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <div className="sm:col-span-2"><Field name={n("label")} label="Name (shown on every flag)" defaultValue={r.label} errors={errorsFor(n("label"))} /></div>
        <Select name={n("index")} label="Index" defaultValue={r.index} errors={errorsFor(n("index"))}
          options={[...FLAGGABLE_INDEX_KEYS.map((k): [string, string] => [k, explanationOf(k).label]), [COVERAGE_CHOICE, "Data quality: beat coverage (fraction 0–1)"]]} />
        <Select name={n("comparator")} label="Flag when" defaultValue={r.comparator} errors={errorsFor(n("comparator"))} options={[["below", "below"], ["above", "above"]]} />
        <Select name={n("threshold")} label="Threshold" defaultValue={r.threshold} errors={errorsFor(n("threshold"))}
          options={[["absolute", "an absolute value"], ["baseline_amount", "baseline minus/plus an amount"], ["baseline_percent", "a percentage of baseline"]]} />
        <Field name={n("value")} label="Value" defaultValue={r.value} errors={errorsFor(n("value"))} inputMode="decimal" />
        <Field name={n("durationValue")} label="For at least" defaultValue={r.durationValue} errors={errorsFor(n("durationValue"))} inputMode="numeric" />
        <Select name={n("durationUnit")} label="Unit" defaultValue={r.durationUnit} errors={errorsFor(n("durationUnit"))} options={[["windows", "consecutive windows"], ["minutes", "minutes"]]} />
        <Field name={n("hysteresisMargin")} label="Clears past the threshold by" defaultValue={r.hysteresisMargin} errors={errorsFor(n("hysteresisMargin"))} inputMode="decimal" />
        <Field name={n("clearWindows")} label="for this many windows" defaultValue={r.clearWindows} errors={errorsFor(n("clearWindows"))} inputMode="numeric" />
        <Select name={n("severity")} label="Severity" defaultValue={r.severity} errors={errorsFor(n("severity"))} options={[["watch", "watch"], ["review", "review"]]} />
      </div>
      <FieldError id={`rules-${i}-error`} errors={errorsFor(`rules.${i}`)} />
      <button type="button" className="btn-secondary mt-2" onClick={onRemove}>Remove rule {i + 1}</button>
    </fieldset>
  );
}
