// A device stream's state as word and shape (GLOSSARY: never colour alone). Live streams are plain; the others are
// drawn with a dashed border so a scan down a column finds them without reading every word.
import { StreamIcon } from "@/components/StreamIcon";
import { STREAM_STATE_LABELS, type StreamState } from "@/lib/devices/stream-state";

export function StreamStateTag({ state, detail }: { state: StreamState; detail?: string }) {
  const tag = state === "live" ? "border-transparent" : state === "not_streaming" ? "border-transparent text-muted" : "border-dashed border-muted bg-surface";
  return (
    <span className={`inline-flex items-center gap-1.5 rounded-md border px-2 py-1 font-bold ${tag}`}>
      <StreamIcon state={state} />
      <span>
        {STREAM_STATE_LABELS[state]}
        {detail && <span className="font-normal text-muted"> · {detail}</span>}
      </span>
    </span>
  );
}
