// A dry-run row's outcome as word and shape (never colour alone): a tick in a circle for "Will be added", a cross
// in a square for "Has errors".
import type { ImportOutcome } from "@/lib/devices/import";

export function OutcomeTag({ outcome }: { outcome: ImportOutcome }) {
  const add = outcome === "add";
  return (
    <span className={`inline-flex items-center gap-1.5 font-bold ${add ? "text-fine" : "text-problem"}`}>
      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5 shrink-0">
        {add ? (
          <>
            <circle cx="10" cy="10" r="8" fill="none" stroke="currentColor" strokeWidth="1.8" />
            <path d="M6 10.5l2.5 2.5 5.5-6" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          </>
        ) : (
          <>
            <rect x="2.5" y="2.5" width="15" height="15" rx="2" fill="none" stroke="currentColor" strokeWidth="1.8" />
            <path d="M7 7l6 6M13 7l-6 6" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          </>
        )}
      </svg>
      {add ? "Will be added" : "Has errors"}
    </span>
  );
}
