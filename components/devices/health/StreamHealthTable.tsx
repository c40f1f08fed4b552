"use client";
// The unit's Stream health table. Rendered on the server first, then kept current with SWR: every 15 s, and soon after
// a live "stream" event of the unit (a stream came or went), coalesced so a flapping device does not refetch per event.
// Sorted most trouble first by default; every column header sorts from the keyboard (buttons, aria-sort).
import Link from "next/link";
import { StreamStateTag } from "@/components/devices/StreamStateTag";
import { RefreshFailedNotice, useLiveRefresh, type LiveRefreshOptions } from "@/components/live/useLiveRefresh";
import { SortableHeader as Header, SortButton, useSort } from "@/components/table/SortableHeader";
import type { StreamHealthRowDTO, UnitStreamHealthDTO } from "@/lib/devices/health";
import { STREAM_STATE_LABELS, type StreamState } from "@/lib/devices/stream-state";
import {
  FIRST_DIRECTION, formatAge, formatDrift, formatInstant, formatOffset, formatRate, formatSeconds, plural, sortRows,
  type HealthSortKey,
} from "./format";

const REFRESH: LiveRefreshOptions = {
  what: "stream health",
  refreshMs: 15_000,
  settleMs: 1_000,
  minGapMs: 5_000,
  refetchOn: (e) => e.type === "stream",
};

/** A live stream with many gaps, malformed events or reconnects: a word and a triangle beside the state. */
function ManyEventsTag() {
  return (
    <span className="mt-1 inline-flex items-center gap-1 rounded-md border border-dashed border-muted px-2 py-0.5 text-sm font-bold">
      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4 shrink-0">
        <path d="M10 3l7.5 13h-15z" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinejoin="round" />
      </svg>
      many events
    </span>
  );
}

const Count = ({ n }: { n: number }) => <span className={n === 0 ? "text-muted" : "font-bold"}>{n.toLocaleString("en")}</span>;

function Row({ r, dto, href }: { r: StreamHealthRowDTO; dto: UnitStreamHealthDTO; href: string }) {
  const tz = dto.unit.timeZone;
  const kinds = Object.entries(r.malformedByKind).filter(([, n]) => n > 0);
  return (
    <tr className={r.state === "not_streaming" ? "text-muted" : ""}>
      <th scope="row" className="border-b border-line py-2 align-top">
        <Link href={href} className="whitespace-nowrap font-mono font-bold">
          {r.serial}
          <span className="sr-only"> — stream health of this device</span>
        </Link>
        <span className="block max-w-40 text-sm font-normal text-muted">{r.model}</span>
      </th>
      <td className="font-mono">{r.bedLabel ?? <span className="font-sans text-muted">no bed</span>}</td>
      <td>
        <StreamStateTag state={r.state} detail={r.notStreamingBecause ?? undefined} />
        {r.trouble.tier === "troubled" && (
          <div>
            <ManyEventsTag />
          </div>
        )}
      </td>
      <td className="whitespace-nowrap">
        {r.lastBeatAt ? (
          <>
            <span className="block">{formatAge(r.lastBeatAt, dto.asOf)}</span>
            <time dateTime={r.lastBeatAt} className="block text-sm text-muted">{formatInstant(r.lastBeatAt, tz, dto.asOf)}</time>
          </>
        ) : (
          <span className="text-muted">never</span>
        )}
      </td>
      <td className="font-mono">{formatRate(r.beatsPerMinute)}</td>
      <td className="whitespace-nowrap">
        <Count n={r.gaps} />
        {r.missingRecords > 0 && <span className="block text-sm text-muted">{plural(r.missingRecords, "record")} missing</span>}
        <span className="block text-sm text-muted">longest {r.longestGapS === null ? "—" : formatSeconds(r.longestGapS)}</span>
      </td>
      <td><Count n={r.duplicates} /></td>
      <td>
        <Count n={r.malformed} />
        {kinds.length > 0 && (
          <span className="block text-sm text-muted">
            since counting began: {kinds.map(([k, n]) => `${k.replaceAll("_", " ")} ${n}`).join(", ")}
          </span>
        )}
      </td>
      <td><Count n={r.reconnects} /></td>
      <td className="whitespace-nowrap font-mono">{formatOffset(r.clockOffsetMs)}</td>
      <td className="whitespace-nowrap">
        {r.drift.msPerHour !== null ? (
          <span className="font-mono">{formatDrift(r.drift.msPerHour)}</span>
        ) : (
          // The full reason is on the device's Stream health tab; the table keeps its width for the figures.
          <span className="text-sm text-muted" title={r.drift.reason ?? undefined}>
            not yet<span className="sr-only">: {r.drift.reason}</span>
          </span>
        )}
      </td>
    </tr>
  );
}

const SUMMARY_ORDER: StreamState[] = ["live", "leads_off", "stale", "offline", "not_streaming"];

/** "3 live · 1 leads off · 1 stale · 0 offline · 2 not streaming". */
function StreamSummary({ counts }: { counts: UnitStreamHealthDTO["counts"] }) {
  return (
    <p className="text-muted">
      {SUMMARY_ORDER.map((s, i) => (
        <span key={s}>
          {i > 0 && " · "}
          <span className="text-2xl font-bold text-ink">{counts[s]}</span> {STREAM_STATE_LABELS[s].toLowerCase()}
        </span>
      ))}
    </p>
  );
}

export function StreamHealthTable({ initial }: { initial: UnitStreamHealthDTO }) {
  const url = `/api/units/${initial.unit.id}/stream-health`;
  const { data: dto, failedAt } = useLiveRefresh(initial.unit.id, url, initial, REFRESH);
  const tz = dto.unit.timeZone;

  const { sort, onSort } = useSort<HealthSortKey>({ key: "trouble", direction: "descending" }, (k) => FIRST_DIRECTION[k]);
  const rows = sortRows(dto.rows, sort.key, sort.direction);
  const base = `/units/${dto.unit.id}/devices`;

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-x-6 gap-y-2">
        <StreamSummary counts={dto.counts} />
        <div className="text-sm">
          <p className="text-muted">
            Last refreshed <time dateTime={dto.asOf}>{formatInstant(dto.asOf, tz, dto.asOf)}</time> · refreshes every 15 s and when a
            stream comes or goes
          </p>
          <RefreshFailedNotice
            failedAt={failedAt && formatInstant(failedAt.toISOString(), tz, dto.asOf)}
            dataOf={formatInstant(dto.asOf, tz, dto.asOf)}
          />
        </div>
      </div>
      <section aria-labelledby="stream-health-heading" className="card">
        <h2 id="stream-health-heading" className="px-4 pt-3">
          Devices <span className="font-normal text-muted">· counts over the last 24 h</span>
        </h2>
        {rows.length === 0 ? (
          <p className="px-4 py-3 text-muted">No devices registered in this unit.</p>
        ) : (
          <div className="mt-2 overflow-x-auto">
            <table className="[&_td]:px-2 [&_td]:align-top [&_th]:px-2">
              <caption className="sr-only">
                Stream health of every device of {dto.unit.name}: state, last beat, beats received per minute, gaps, duplicates,
                malformed events, reconnects, clock offset and drift. Column headers sort the table; the Stream column sorts
                most trouble first.
              </caption>
              <thead>
                <tr>
                  <Header keys={["serial"]} sort={sort}>
                    <SortButton sortKey="serial" sort={sort} onSort={onSort}>Device</SortButton>
                  </Header>
                  <Header keys={["bed"]} sort={sort}>
                    <SortButton sortKey="bed" sort={sort} onSort={onSort}>Bed</SortButton>
                  </Header>
                  <Header keys={["trouble"]} sort={sort}>
                    <SortButton sortKey="trouble" sort={sort} onSort={onSort}>
                      Stream<span className="sr-only">, sorted by trouble</span>
                    </SortButton>
                    <span className="block px-1 text-sm font-normal text-muted">most trouble first</span>
                  </Header>
                  <Header keys={["lastBeat"]} sort={sort}>
                    <SortButton sortKey="lastBeat" sort={sort} onSort={onSort}>Last beat</SortButton>
                  </Header>
                  <Header keys={["rate"]} sort={sort}>
                    <SortButton sortKey="rate" sort={sort} onSort={onSort}>Beats received per min</SortButton>
                    <span className="block px-1 text-sm font-normal text-muted">last 5 min</span>
                  </Header>
                  <Header keys={["gaps", "longestGap"]} sort={sort}>
                    <div>
                      <SortButton sortKey="gaps" sort={sort} onSort={onSort}>Gaps</SortButton>
                    </div>
                    <div>
                      <SortButton sortKey="longestGap" sort={sort} onSort={onSort} className="text-sm font-normal">
                        longest<span className="sr-only"> gap between beats</span>
                      </SortButton>
                    </div>
                  </Header>
                  <Header keys={["duplicates"]} sort={sort}>
                    <SortButton sortKey="duplicates" sort={sort} onSort={onSort}>Duplicates</SortButton>
                  </Header>
                  <Header keys={["malformed"]} sort={sort}>
                    <SortButton sortKey="malformed" sort={sort} onSort={onSort}>Malformed</SortButton>
                  </Header>
                  <Header keys={["reconnects"]} sort={sort}>
                    <SortButton sortKey="reconnects" sort={sort} onSort={onSort}>Reconnects</SortButton>
                  </Header>
                  <Header keys={["offset"]} sort={sort}>
                    <SortButton sortKey="offset" sort={sort} onSort={onSort}>Clock offset</SortButton>
                  </Header>
                  <Header keys={["drift"]} sort={sort}>
                    <SortButton sortKey="drift" sort={sort} onSort={onSort}>Drift</SortButton>
                  </Header>
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <Row key={r.deviceId} r={r} dto={dto} href={`${base}/${r.deviceId}/health`} />
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <p className="text-sm text-muted">
        A gap is a run of records the device numbered but never delivered; the longest gap is the longest time between two
        stored beats. Clock offset is the device&apos;s clock minus the server&apos;s; drift is its least-squares slope over the
        day&apos;s minute samples (shown once they span 2 h). Sorted by trouble: offline (longest silence first), stale, live
        with {dto.manyEvents} or more gaps, malformed events and reconnects together in 24 h, leads off (the device is heard but
        reports no patient signal, as on an empty bed), live and clean, then devices Corvane does not read.
      </p>
    </div>
  );
}
