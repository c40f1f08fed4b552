// A device stream's state as word and shape (GLOSSARY: never colour alone). Live streams are plain; the others are
// drawn with a dashed border so a scan down a column finds them without reading every word.
import { STREAM_STATE_LABELS, type StreamState } from "@/lib/devices/stream-state";

function StateIcon({ state }: { state: StreamState }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5 shrink-0">
      {state === "live" && (
        <>
          <circle cx="10" cy="10" r="3.5" fill="currentColor" />
          <path d="M5 5a7 7 0 0 0 0 10M15 5a7 7 0 0 1 0 10" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
      {state === "stale" && (
        <>
          <circle cx="10" cy="10" r="8" fill="none" stroke="currentColor" strokeWidth="1.8" />
          <path d="M10 5.5V10l3 2" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
      {state === "offline" && (
        <>
          <circle cx="10" cy="10" r="8" fill="none" stroke="currentColor" strokeWidth="1.8" />
          <path d="M5 15L15 5" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
      {state === "not_streaming" && <path d="M4 10h12" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />}
    </svg>
  );
}

export function StreamStateTag({ state, detail }: { state: StreamState; detail?: string }) {
  const tag = state === "live" ? "border-transparent" : state === "not_streaming" ? "border-transparent text-muted" : "border-dashed border-muted bg-surface";
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-md border px-2 py-1 font-bold ${tag}`}>
      <StateIcon state={state} />
      <span>
        {STREAM_STATE_LABELS[state]}
        {detail && <span className="font-normal text-muted"> · {detail}</span>}
      </span>
    </span>
  );
}
