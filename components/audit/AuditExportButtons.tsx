"use client";
// Export buttons of the Audit trail page. Each is a plain link to the export route (works without JavaScript); with
// JavaScript it fetches the file itself, reads the stream, shows rows received of the expected count, then saves
// the file, and can be cancelled (the server then marks the export failed). Rows are counted from the bytes: NDJSON
// has one line per row; CSV lines end in CRLF, but a quoted field may hold line breaks, so only line feeds outside
// quotes count.
import Link from "next/link";
import { useRef, useState } from "react";

type Format = "csv" | "fhir-ndjson";
const LABEL: Record<Format, string> = { csv: "CSV", "fhir-ndjson": "FHIR R4 NDJSON" };
const QUOTE = 0x22;
const LF = 0x0a;

type State =
  | { kind: "idle" }
  | { kind: "running"; format: Format; rows: number; expected: number | null; bytes: number }
  | { kind: "done"; format: Format; rows: number; fileName: string }
  | { kind: "cancelled" }
  | { kind: "error"; message: string };

/** Counts complete records in a byte stream, chunk by chunk. */
function recordCounter(format: Format) {
  let inQuotes = false;
  let lines = 0;
  return (chunk: Uint8Array): number => {
    for (let i = 0; i < chunk.length; i++) {
      const b = chunk[i];
      if (format === "csv" && b === QUOTE) inQuotes = !inQuotes;
      else if (b === LF && !inQuotes) lines++;
    }
    // The CSV's first line is its header.
    return format === "csv" ? Math.max(0, lines - 1) : lines;
  };
}

const n = (v: number) => v.toLocaleString("en");
const size = (bytes: number) => (bytes < 1_048_576 ? `${Math.ceil(bytes / 1024)} KB` : `${(bytes / 1_048_576).toFixed(1)} MB`);

export function AuditExportButtons({ query }: { query: string }) {
  const [state, setState] = useState<State>({ kind: "idle" });
  const abort = useRef<AbortController | null>(null);
  const href = (format: Format) => `/api/audit/export?${query}${query ? "&" : ""}format=${format}`;

  async function run(format: Format) {
    const controller = new AbortController();
    abort.current = controller;
    setState({ kind: "running", format, rows: 0, expected: null, bytes: 0 });
    try {
      const res = await fetch(href(format), { signal: controller.signal, cache: "no-store" });
      if (!res.ok || !res.body) {
        const body = (await res.json().catch(() => null)) as { message?: string } | null;
        setState({ kind: "error", message: body?.message ?? `The export did not start (HTTP ${res.status}). Try again.` });
        return;
      }
      const expected = Number(res.headers.get("X-Corvane-Export-Rows"));
      const fileName = /filename="([^"]+)"/.exec(res.headers.get("Content-Disposition") ?? "")?.[1] ?? `corvane-audit.${format === "csv" ? "csv" : "ndjson"}`;
      const count = recordCounter(format);
      const parts: Uint8Array<ArrayBuffer>[] = [];
      const reader = res.body.getReader();
      let rows = 0;
      let bytes = 0;
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        parts.push(value as Uint8Array<ArrayBuffer>);
        rows = count(value);
        bytes += value.byteLength;
        setState({ kind: "running", format, rows, expected: Number.isFinite(expected) ? expected : null, bytes });
      }
      const url = URL.createObjectURL(new Blob(parts, { type: res.headers.get("Content-Type") ?? "application/octet-stream" }));
      const a = document.createElement("a");
      a.href = url;
      a.download = fileName;
      document.body.append(a);
      a.click();
      a.remove();
      // Let the browser start the download before the object URL goes.
      setTimeout(() => URL.revokeObjectURL(url), 60_000);
      setState({ kind: "done", format, rows, fileName });
    } catch (err) {
      if (controller.signal.aborted) setState({ kind: "cancelled" });
      else setState({ kind: "error", message: `The export stopped: ${err instanceof Error ? err.message : "connection lost"}. Nothing was saved; try again.` });
    } finally {
      abort.current = null;
    }
  }

  const running = state.kind === "running";
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        {(["csv", "fhir-ndjson"] as const).map((format) => (
          <a
            key={format}
            href={href(format)}
            className="btn-secondary"
            aria-disabled={running || undefined}
            onClick={(e) => {
              e.preventDefault();
              if (!running) void run(format);
            }}
          >
            <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4">
              <path d="M10 3v10m-4-4 4 4 4-4M4 16h12" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
            </svg>
            Export {LABEL[format]}
          </a>
        ))}
        {running && (
          <button type="button" className="btn-secondary" onClick={() => abort.current?.abort()}>
            Cancel export
          </button>
        )}
      </div>
      {running && (
        <div>
          <p id="export-progress-label" className="text-sm">
            Exporting {LABEL[state.format]}: {n(state.rows)}
            {state.expected !== null ? ` of ${n(state.expected)}` : ""} rows ({size(state.bytes)})
          </p>
          <div
            role="progressbar"
            aria-labelledby="export-progress-label"
            aria-valuemin={0}
            aria-valuemax={state.expected ?? undefined}
            aria-valuenow={state.rows}
            className="mt-1 h-3 w-full max-w-md overflow-hidden rounded-full border border-line bg-raised"
          >
            <div className="h-full bg-accent" style={{ width: `${state.expected ? Math.min(100, (100 * state.rows) / state.expected) : 0}%` }} />
          </div>
        </div>
      )}
      <p aria-live="polite" className="text-sm">
        {state.kind === "running" && <span className="sr-only">Export started.</span>}
        {state.kind === "done" && (
          <>
            <span aria-hidden="true">✓ </span>Saved {state.fileName}: {n(state.rows)} rows. Its manifest (rows, hashes, SHA-256) is in{" "}
            <Link href="/audit/exports">your exports</Link>.
          </>
        )}
        {state.kind === "cancelled" && "Export cancelled; no file was saved."}
        {state.kind === "error" && (
          <span className="text-problem">
            <span aria-hidden="true">✕ </span>
            {state.message}
          </span>
        )}
      </p>
    </div>
  );
}
