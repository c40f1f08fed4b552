// A review flag's severity as the charts draw it: a dashed box with a single hatch for "watch", a solid cross-hatched
// box for "review", always with the word beside it (GLOSSARY: shape and text, never colour alone).
import type { FlagRow } from "@/lib/db/tables";

export function SeverityTag({ severity }: { severity: FlagRow["severity"] }) {
  return (
    <span className="inline-flex items-center gap-1.5 font-bold">
      <svg aria-hidden="true" viewBox="0 0 16 16" className="h-4 w-4 shrink-0 text-caution">
        <rect x="1" y="1" width="14" height="14" fill="none" stroke="currentColor" strokeWidth={severity === "review" ? 2 : 1.2} strokeDasharray={severity === "review" ? undefined : "3 2"} />
        <path d="M1 15 L15 1 M1 8 L8 1 M8 15 L15 8" stroke="currentColor" strokeWidth="1" />
        {severity === "review" && <path d="M1 1 L15 15 M1 8 L8 15 M8 1 L15 8" stroke="currentColor" strokeWidth="1" />}
      </svg>
      <span className="sr-only">Severity: </span>
      {severity}
    </span>
  );
}
