"use client";
// The census table. Rendered on the server first, then kept current with SWR (a refresh every 5 minutes while
// the tab is visible; each read is audited as a view).
import useSWR from "swr";
import type { CensusDTO } from "@/lib/units/repository";
import { formatDuration, formatLocal } from "@/lib/time";

const REFRESH_MS = 5 * 60_000;

async function fetchCensus(url: string): Promise<CensusDTO> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) throw new Error(`census request failed (${res.status})`);
  return (await res.json()) as CensusDTO;
}

export function CensusTable({ initial }: { initial: CensusDTO }) {
  const { data, error } = useSWR(`/api/units/${initial.unit.id}/census`, fetchCensus, {
    fallbackData: initial,
    refreshInterval: REFRESH_MS,
    revalidateOnFocus: false,
    revalidateOnMount: false,
  });
  const census = data ?? initial;
  const tz = census.unit.timeZone;
  return (
    <section aria-labelledby="census-heading" className="card overflow-x-auto">
      <div className="flex flex-wrap items-baseline justify-between gap-2 px-4 pt-4">
        <h2 id="census-heading">Beds and current stays</h2>
        <p className="text-sm text-muted" aria-live="polite">
          As of {formatLocal(census.asOf, tz)}
          {error ? " · could not refresh; showing the last census read" : ""}
        </p>
      </div>
      <table className="mt-2">
        <caption className="sr-only">Beds of {census.unit.name} with the patient currently in each bed</caption>
        <thead>
          <tr>
            <th scope="col">Bed</th>
            <th scope="col">Patient</th>
            <th scope="col">Record number</th>
            <th scope="col">Admitted</th>
            <th scope="col">In bed for</th>
          </tr>
        </thead>
        <tbody>
          {census.beds.map((b) => (
            <tr key={b.bedId} className={b.stay ? "" : "text-muted"}>
              <th scope="row" className="border-b border-line px-3 py-2 font-mono text-ink">{b.bedLabel}</th>
              {b.stay ? (
                <>
                  <td className="font-bold">{b.stay.displayName}</td>
                  <td className="font-mono">{b.stay.recordNumber}</td>
                  <td>
                    <time dateTime={b.stay.admittedAt}>{formatLocal(b.stay.admittedAt, tz)}</time>
                  </td>
                  <td>{formatDuration(b.stay.admittedAt, census.asOf)}</td>
                </>
              ) : (
                <td colSpan={4}>
                  <span aria-hidden="true">— </span>Empty bed
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
