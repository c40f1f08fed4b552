"use client";
// The night's review flags as a table: the keyboard route to every flagged window (Window detail) and to the zoom
// panel, and the text alternative of the flag shading on the charts. Severity is a word and a shape, never colour.
import Link from "next/link";
import type { FlagViewDTO } from "@/lib/review/flags-view";
import { clock, windowHref } from "./format";
import { SeverityTag } from "@/components/flags/SeverityTag";

const STATE_WORDS: Record<FlagViewDTO["state"], string> = {
  open: "open",
  acknowledged: "acknowledged",
  escalated: "escalated",
  resolved: "resolved",
};


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
