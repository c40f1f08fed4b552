// The shape of a stream's state, beside its word (GLOSSARY: never colour alone). One set of shapes for the device
// screens (live / leads off / stale / offline / not streaming) and the Ward overview (live / leads off / stale / no
// device), so a state looks the same wherever it is shown. Leads off is the one shape with no ring, bar or box: a lead
// hanging loose beside its electrode.
import type { StreamState } from "@/lib/devices/stream-state";

export function StreamIcon({ state }: { state: StreamState | "no_device" }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 20 20" className="h-5 w-5 shrink-0">
      {state === "live" && (
        <>
          <circle cx="10" cy="10" r="3.5" fill="currentColor" />
          <path d="M5 5a7 7 0 0 0 0 10M15 5a7 7 0 0 1 0 10" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
      {state === "leads_off" && (
        <>
          <circle cx="13.5" cy="6.5" r="4" fill="none" stroke="currentColor" strokeWidth="1.8" />
          <circle cx="13.5" cy="6.5" r="1.2" fill="currentColor" />
          <path d="M2.5 17.5c4 0 5.5-1.5 5.5-5.5" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
          <circle cx="8" cy="11" r="1.8" fill="currentColor" />
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
      {state === "no_device" && (
        <>
          <rect x="3" y="6" width="14" height="9" rx="2" fill="none" stroke="currentColor" strokeWidth="1.8" />
          <path d="M3 17L17 3" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </>
      )}
    </svg>
  );
}
