// Chooses the night by URL (?night=YYYY-MM-DD): a plain GET form, so it works with the keyboard and without script.
import { nightOption } from "./format";

export interface NightChoice {
  night: string;
  from: string;
  to: string;
  hours: number;
}

export function NightPicker({ nights, selected, timeZone }: { nights: NightChoice[]; selected: NightChoice; timeZone: string }) {
  const choices = nights.some((n) => n.night === selected.night) ? nights : [selected, ...nights];
  return (
    <form method="get" className="flex flex-wrap items-end gap-2 print:hidden">
      <div>
        <label htmlFor="night" className="mb-1 block text-sm font-bold">Night</label>
        <select id="night" name="night" defaultValue={selected.night} className="field-input w-auto">
          {choices.map((n) => (
            <option key={n.night} value={n.night}>{nightOption(n, timeZone)}</option>
          ))}
        </select>
      </div>
      <button type="submit" className="btn-secondary">Show night</button>
    </form>
  );
}
