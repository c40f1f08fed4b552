"use client";
// The Ward overview table. Rendered on the server first, then kept current with SWR: every minute, and soon after a
// live event of the unit (new windows, flags, stream status), coalesced so a busy unit does not refetch per event.
// Each fetch is an audited read. Sorting is local; the unit's bed order is the default and breaks every tie.
import Link from "next/link";
import { useCallback, useEffect, useRef, useState } from "react";
import useSWR from "swr";
import { useLiveEvents } from "@/components/live/useLiveEvents";
import type { OverviewBedDTO, WardOverviewDTO } from "@/lib/review/overview";
import { FlagsCell, QualityCell, StreamCell, ValueCell } from "./Cells";
import { FIRST_DIRECTION, INDEX_COLUMNS, INDEX_KEYS, formatClock, sortBeds, type SortDirection, type SortKey } from "./format";
import { Sparkline } from "./Sparkline";

const REFRESH_MS = 60_000;
/** After a live event, wait this long for more before refetching, and refetch at most this often. */
const EVENT_SETTLE_MS = 2_000;
const EVENT_MIN_GAP_MS = 15_000;

async function fetchOverview(url: string): Promise<WardOverviewDTO> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) throw new Error(`overview request failed (${res.status})`);
  return (await res.json()) as WardOverviewDTO;
}

function SortIcon({ direction }: { direction: SortDirection | null }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 12 16" className="h-4 w-3 shrink-0">
      <path d="M6 1.5L10 6H2z" fill={direction === "ascending" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.2" />
      <path d="M6 14.5L10 10H2z" fill={direction === "descending" ? "currentColor" : "none"} stroke="currentColor" strokeWidth="1.2" />
    </svg>
  );
}

interface SortState {
  key: SortKey;
  direction: SortDirection;
}

function SortButton({ sortKey, sort, onSort, children, className = "" }: {
  sortKey: SortKey;
  sort: SortState;
  onSort: (k: SortKey) => void;
  children: React.ReactNode;
  className?: string;
}) {
  const active = sort.key === sortKey;
  return (
    <button
      type="button"
      onClick={() => onSort(sortKey)}
      className={`inline-flex min-h-6 min-w-6 cursor-pointer items-center gap-1 rounded px-1 py-0.5 text-left font-bold hover:text-ink ${active ? "text-ink underline decoration-accent decoration-2 underline-offset-4" : ""} ${className}`}
    >
      {children}
      <SortIcon direction={active ? sort.direction : null} />
    </button>
  );
}

/** A header whose aria-sort follows the column's active sort key(s). */
function SortableHeader({ keys, sort, children, className = "" }: { keys: SortKey[]; sort: SortState; children: React.ReactNode; className?: string }) {
  return (
    <th scope="col" aria-sort={keys.includes(sort.key) ? sort.direction : "none"} className={`align-bottom 2xl:text-base ${className}`}>
      {children}
    </th>
  );
}

const isDimmed = (b: OverviewBedDTO) => b.stream.state !== "live";

function BedRow({ bed, overview }: { bed: OverviewBedDTO; overview: WardOverviewDTO }) {
  const tz = overview.unit.timeZone;
  const rowHeader = <th scope="row" className="whitespace-nowrap border-b border-line px-2 py-2 align-top font-mono text-lg text-ink 2xl:text-2xl">{bed.bedLabel}</th>;
  if (!bed.stay) {
    return (
      <tr className="text-muted">
        {rowHeader}
        <td colSpan={INDEX_KEYS.length + 3}>
          <span aria-hidden="true">— </span>Empty bed
        </td>
        <StreamCell stream={bed.stream} timeZone={tz} asOf={overview.asOf} />
        <td />
      </tr>
    );
  }
  const dimmed = isDimmed(bed);
  return (
    <tr className={dimmed ? "bg-surface" : ""}>
      {rowHeader}
      <td>
        <Link href={`/stays/${bed.stay.stayId}/night`} className="block font-bold 2xl:text-lg">
          {bed.stay.displayName}
          <span className="sr-only"> — Night review</span>
        </Link>
        <span className="block font-mono text-sm text-muted">{bed.stay.recordNumber}</span>
        <Link href={`/stays/${bed.stay.stayId}/handoff`} className="text-sm">
          Handoff summary<span className="sr-only"> for {bed.stay.displayName}</span>
        </Link>
      </td>
      {INDEX_KEYS.map((k) => (
        <ValueCell key={k} v={bed.latest?.values[k]} col={INDEX_COLUMNS[k]} dimmed={dimmed} />
      ))}
      <td className="w-[208px] min-w-[208px] 2xl:w-[22rem]">
        {bed.sparkline && (
          <Sparkline data={bed.sparkline} admittedAt={bed.stay?.admittedAt ?? null} from={overview.night.from} to={overview.night.to} bucketS={overview.night.bucketS} timeZone={tz} dimmed={dimmed} />
        )}
      </td>
      <QualityCell latest={bed.latest} timeZone={tz} asOf={overview.asOf} />
      <StreamCell stream={bed.stream} timeZone={tz} asOf={overview.asOf} />
      <FlagsCell flags={bed.flags} />
    </tr>
  );
}

export function OverviewTable({ initial }: { initial: WardOverviewDTO }) {
  const url = `/api/units/${initial.unit.id}/overview`;
  const [failedAt, setFailedAt] = useState<Date | null>(null);
  /** When the table last asked the server (the server render counts: the page has just read it). */
  const lastFetch = useRef(0);
  useEffect(() => {
    lastFetch.current = Date.now();
  }, []);
  const { data, mutate } = useSWR(url, fetchOverview, {
    fallbackData: initial,
    refreshInterval: REFRESH_MS,
    revalidateOnFocus: false,
    revalidateOnMount: false,
    keepPreviousData: true,
    onSuccess: () => {
      lastFetch.current = Date.now();
      setFailedAt(null);
    },
    onError: () => {
      lastFetch.current = Date.now();
      setFailedAt(new Date());
    },
  });
  const overview = data ?? initial;
  const tz = overview.unit.timeZone;

  const pending = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(pending.current), []);
  const onLive = useCallback(() => {
    if (pending.current) return;
    const wait = Math.max(EVENT_SETTLE_MS, EVENT_MIN_GAP_MS - (Date.now() - lastFetch.current));
    pending.current = setTimeout(() => {
      pending.current = undefined;
      void mutate();
    }, wait);
  }, [mutate]);
  useLiveEvents(initial.unit.id, onLive);

  const [sort, setSort] = useState<SortState>({ key: "bed", direction: "ascending" });
  const onSort = (key: SortKey) =>
    setSort((s) =>
      s.key === key
        ? { key, direction: s.direction === "ascending" ? "descending" : "ascending" }
        : { key, direction: FIRST_DIRECTION[key] ?? "ascending" },
    );
  const beds = sortBeds(overview.beds, sort.key, sort.direction);

  return (
    <section aria-labelledby="overview-heading" className="card">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 px-4 pt-3">
        <h2 id="overview-heading">
          Beds, latest 5-min window{" "}
          <span className="font-normal text-muted">
            · night of {overview.night.night}, from {formatClock(overview.night.from, tz)}
          </span>
        </h2>
        <div className="text-sm">
          <p className="text-muted">
            Last refreshed <time dateTime={overview.asOf}>{formatClock(overview.asOf, tz)}</time> · refreshes every
            minute and on new data
          </p>
          <div role="status">
          {failedAt && (
            <p className="mt-1 flex items-center gap-2 rounded-md border border-problem bg-problem-surface px-2 py-1 text-ink">
              <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4 shrink-0 text-problem">
                <circle cx="10" cy="10" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.8" />
                <path d="M10 5v6m0 3.5v.5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
              </svg>
              Refresh failed at {formatClock(failedAt.toISOString(), tz)}; the table still shows the data of{" "}
              {formatClock(overview.asOf, tz)}.
            </p>
          )}
          </div>
        </div>
      </div>
      <div className="mt-2 overflow-x-auto">
        <table className="[&_td]:px-2 [&_th]:px-2">
          <caption className="sr-only">
            Beds of {overview.unit.name}: each patient&apos;s latest indices with the change from their own baseline,
            heart rate over the night, signal quality, stream status and open review flags. Column headers sort the table.
          </caption>
          <thead>
            <tr>
              <SortableHeader keys={["bed"]} sort={sort}>
                <SortButton sortKey="bed" sort={sort} onSort={onSort}>Bed</SortButton>
              </SortableHeader>
              <SortableHeader keys={["patient"]} sort={sort}>
                <SortButton sortKey="patient" sort={sort} onSort={onSort}>Patient</SortButton>
              </SortableHeader>
              {INDEX_KEYS.map((k) => {
                const col = INDEX_COLUMNS[k];
                return (
                  <SortableHeader key={k} keys={[k, `${k}:change`]} sort={sort}>
                    <div>
                      <SortButton sortKey={k} sort={sort} onSort={onSort}>
                        <span aria-hidden="true">{col.label}</span>
                        <span className="sr-only">{col.spoken}</span>
                      </SortButton>
                    </div>
                    <div>
                      <SortButton sortKey={`${k}:change`} sort={sort} onSort={onSort} className="text-sm font-normal">
                        change<span className="sr-only"> of {col.spoken} from baseline</span>
                      </SortButton>
                    </div>
                  </SortableHeader>
                );
              })}
              <th scope="col" className="align-bottom 2xl:text-base">HR over the night</th>
              <SortableHeader keys={["quality"]} sort={sort}>
                <SortButton sortKey="quality" sort={sort} onSort={onSort}>Signal quality</SortButton>
              </SortableHeader>
              <SortableHeader keys={["stream"]} sort={sort}>
                <SortButton sortKey="stream" sort={sort} onSort={onSort}>Stream</SortButton>
              </SortableHeader>
              <SortableHeader keys={["flags"]} sort={sort}>
                <SortButton sortKey="flags" sort={sort} onSort={onSort}>Open flags</SortButton>
              </SortableHeader>
            </tr>
          </thead>
          <tbody>
            {beds.map((b) => (
              <BedRow key={b.bedId} bed={b} overview={overview} />
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
