"use client";
// The night's review flags as a table: the keyboard route to every flagged window (Window detail) and to the zoom
// panel, and the text alternative of the flag shading on the charts. Severity is a word and a shape, never colour.
import Link from "next/link";
import type { FlagViewDTO } from "@/lib/review/flags-view";
import { clock, windowHref } from "./format";

const STATE_WORDS: Record<FlagViewDTO["state"], string> = {
  open: "open",
  acknowledged: "acknowledged",
  escalated: "escalated",
  resolved: "resolved",
};

/** The severity as on the charts: diagonal hatch for watch, cross-hatch for review, with the word beside it. */
function SeverityTag({ severity }: { severity: FlagViewDTO["severity"] }) {
  return (
    <span className="inline-flex items-center gap-1.5 font-bold">
      <svg aria-hidden="true" viewBox="0 0 16 16" className="h-4 w-4 shrink-0 text-caution">
        <rect x="1" y="1" width="14" height="14" fill="none" stroke="currentColor" strokeWidth={severity === "review" ? 2 : 1.2} strokeDasharray={severity === "review" ? undefined : "3 2"} />
        <path d="M1 15 L15 1 M1 8 L8 1 M8 15 L15 8" stroke="currentColor" strokeWidth="1" />
        {severity === "review" && <path d="M1 1 L15 15 M1 8 L8 15 M8 1 L15 8" stroke="currentColor" strokeWidth="1" />}
      </svg>
      {severity}
    </span>
  );
}

export function FlagTable({ stayId, flags, timeZone, untilS, onShow }: {
  stayId: string;
  flags: FlagViewDTO[];
  timeZone: string;
  /** Where a flag still standing is drawn up to. */
  untilS: number;
  onShow: (fromS: number, toS: number) => void;
}) {
  return (
    <section aria-labelledby="flags-heading" className="card p-4">
      <h2 id="flags-heading">Flagged windows this night</h2>
      {flags.length === 0 ? (
        <p className="mt-2 text-muted">No review flags overlapped this night.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="mt-2">
            <caption className="sr-only">Review flags whose condition overlapped this night, oldest first</caption>
            <thead>
              <tr>
                <th scope="col">Severity</th>
                <th scope="col">Rule</th>
                <th scope="col">When</th>
                <th scope="col">State</th>
                <th scope="col"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {flags.map((f) => {
                const fromS = Date.parse(f.conditionFrom) / 1000;
                const toS = f.conditionTo ? Date.parse(f.conditionTo) / 1000 : untilS;
                return (
                  <tr key={f.id}>
                    <td><SeverityTag severity={f.severity} /></td>
                    <th scope="row" className="font-normal text-ink">{f.label}</th>
                    <td className="whitespace-nowrap">
                      {clock(fromS, timeZone)} – {f.conditionTo ? clock(toS, timeZone) : "still holding"}
                    </td>
                    <td>{STATE_WORDS[f.state]}</td>
                    <td className="whitespace-nowrap">
                      <Link href={windowHref(stayId, fromS)}>
                        Open first window<span className="sr-only"> of the {f.severity} flag at {clock(fromS, timeZone)}</span>
                      </Link>
                      <button type="button" className="ml-3 text-accent underline-offset-2 hover:underline" onClick={() => onShow(fromS, toS)}>
                        Zoom here<span className="sr-only"> ({f.severity} flag at {clock(fromS, timeZone)})</span>
                      </button>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
