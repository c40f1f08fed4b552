// The Quality metrics filter as a plain GET form: the choice lives in the URL (shareable, survives a reload, the same
// query the CSV link sends) and works without JavaScript. Errors from an edited address are shown by their fields.
import Link from "next/link";
import { FieldError } from "@/components/FieldError";

export interface FilterUnit {
  id: string;
  name: string;
  timeZone: string;
}

export function QualityFilterForm({ units, values, errors }: {
  units: FilterUnit[];
  values: { unit: string; from: string; to: string };
  errors: Record<string, string[]>;
}) {
  const invalid = (k: string) => (errors[k]?.length ? true : undefined);
  return (
    <form method="get" action="/quality" aria-label="Choose units and dates" className="card flex flex-wrap items-start gap-x-4 gap-y-3 px-4 py-3">
      <div>
        <label htmlFor="quality-unit" className="mb-1 block text-sm font-bold">Unit</label>
        <select id="quality-unit" name="unit" defaultValue={values.unit} className="field-input" aria-invalid={invalid("unit")} aria-describedby="quality-unit-error">
          <option value="">All my units</option>
          {units.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
        </select>
        <FieldError id="quality-unit-error" errors={errors.unit} />
      </div>
      <div>
        <label htmlFor="quality-from" className="mb-1 block text-sm font-bold">First day</label>
        <input id="quality-from" name="from" type="date" defaultValue={values.from} className="field-input" aria-invalid={invalid("from")} aria-describedby="quality-from-error quality-dates-hint" />
        <FieldError id="quality-from-error" errors={errors.from} />
      </div>
      <div>
        <label htmlFor="quality-to" className="mb-1 block text-sm font-bold">Last day</label>
        <input id="quality-to" name="to" type="date" defaultValue={values.to} className="field-input" aria-invalid={invalid("to")} aria-describedby="quality-to-error quality-dates-hint" />
        <FieldError id="quality-to-error" errors={errors.to} />
      </div>
      <div className="self-center pt-1">
        <button type="submit" className="btn-secondary">Show</button>
      </div>
      <Link href="/quality" className="self-center pt-1">Last 7 complete days</Link>
      <p id="quality-dates-hint" className="basis-full text-sm text-muted">
        Both days included, each from 00:00 to 24:00 in the unit&apos;s own time zone.
      </p>
    </form>
  );
}
