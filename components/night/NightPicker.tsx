// Choosing the night: previous/next links and a list of the stay's nights, sent with a button (a GET form, so the
// choice is in the URL as ?night= and nothing navigates on a mere change of selection, WCAG 3.2.2).
import Link from "next/link";
import { formatInTimeZone } from "date-fns-tz";
import type { NightBoundsDTO } from "@/lib/review/night-windows";

const nightWords = (n: NightBoundsDTO, timeZone: string) =>
  `${formatInTimeZone(n.from, timeZone, "EEE d MMM")} (${n.hours} h)`;

export function NightPicker({ stayId, current, nights, timeZone }: { stayId: string; current: string; nights: NightBoundsDTO[]; timeZone: string }) {
  const i = nights.findIndex((n) => n.night === current);
  // Newest first: the previous night is the next entry, the following night the one before.
  const previous = i >= 0 ? nights[i + 1] : undefined;
  const next = i > 0 ? nights[i - 1] : undefined;
  const href = (n: NightBoundsDTO) => `/stays/${stayId}/night?night=${n.night}`;
  return (
    <nav aria-label="Nights of this stay" className="flex flex-wrap items-end gap-3">
      {i < 0 && nights[0] ? (
        <Link href={href(nights[0])} className="btn-secondary">
          Latest night of this stay<span className="sr-only">: {nightWords(nights[0], timeZone)}</span>
        </Link>
      ) : null}
      {previous ? (
        <Link href={href(previous)} className="btn-secondary">
          <span aria-hidden="true">←</span> Night before<span className="sr-only">: {nightWords(previous, timeZone)}</span>
        </Link>
      ) : null}
      {next ? (
        <Link href={href(next)} className="btn-secondary">
          Night after<span className="sr-only">: {nightWords(next, timeZone)}</span> <span aria-hidden="true">→</span>
        </Link>
      ) : null}
      {(nights.length > 1 || (i < 0 && nights.length > 0)) && (
        <form method="get" action={`/stays/${stayId}/night`} className="flex items-end gap-2">
          <div>
            <label htmlFor="night-choice" className="mb-1 block text-sm text-muted">Night of</label>
            <select id="night-choice" name="night" defaultValue={current} className="field-input">
              {nights.map((n) => (
                <option key={n.night} value={n.night}>{nightWords(n, timeZone)}</option>
              ))}
            </select>
          </div>
          <button type="submit" className="btn-secondary">Show</button>
        </form>
      )}
    </nav>
  );
}
