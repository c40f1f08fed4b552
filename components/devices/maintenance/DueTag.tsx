// Where a device's next maintenance stands, as word and shape (GLOSSARY: never colour alone): overdue has a dashed
// box and a calendar with an exclamation mark, due soon a calendar with a clock hand, later a plain calendar.
import { dueWords, formatDay } from "./format";

type Standing = "overdue" | "soon" | "later";

function CalendarIcon({ standing }: { standing: Standing }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5 shrink-0">
      <rect x="2.5" y="4" width="15" height="13.5" rx="1.5" fill="none" stroke="currentColor" strokeWidth="1.6" />
      <path d="M2.5 8h15M6.5 2.5v3M13.5 2.5v3" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
      {standing === "overdue" && (
        <>
          <path d="M10 10v3.5" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          <circle cx="10" cy="15.6" r="1" fill="currentColor" />
        </>
      )}
      {standing === "soon" && <path d="M10 10v2.8l2 1.2" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />}
    </svg>
  );
}

export function DueTag({ nextDueOn, daysUntilDue, dueSoonDays, size = "normal" }: {
  nextDueOn: string;
  daysUntilDue: number;
  dueSoonDays: number;
  size?: "normal" | "large";
}) {
  const standing: Standing = daysUntilDue < 0 ? "overdue" : daysUntilDue <= dueSoonDays ? "soon" : "later";
  const box =
    standing === "overdue"
      ? "border-dashed border-caution bg-caution-surface text-ink"
      : standing === "soon"
        ? "border-line bg-raised text-ink"
        : "border-transparent text-ink";
  return (
    <span className={`inline-flex items-center gap-2 rounded-md border px-2 py-1 ${box} ${size === "large" ? "text-lg" : ""}`}>
      <CalendarIcon standing={standing} />
      <span>
        <span className="font-bold">{dueWords(daysUntilDue)}</span>
        <span className="text-muted"> · <time dateTime={nextDueOn}>{formatDay(nextDueOn)}</time></span>
      </span>
    </span>
  );
}
