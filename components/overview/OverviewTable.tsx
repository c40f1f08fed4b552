"use client";
// The Ward overview table. Rendered on the server first, then kept current with SWR: every minute, and soon after a
// live event of the unit (new windows, flags, stream status), coalesced so a busy unit does not refetch per event.
// Each fetch is an audited read. Sorting is local; the unit's bed order is the default and breaks every tie.
import Link from "next/link";
import { RefreshFailedNotice, useLiveRefresh, type LiveRefreshOptions } from "@/components/live/useLiveRefresh";
import { SortableHeader as SharedHeader, SortButton, useSort, type SortState } from "@/components/table/SortableHeader";
import type { OverviewBedDTO, WardOverviewDTO } from "@/lib/review/overview";
import { FlagsCell, QualityCell, StreamCell, ValueCell } from "./Cells";
import { FIRST_DIRECTION, INDEX_COLUMNS, INDEX_KEYS, formatClock, sortBeds, type SortKey } from "./format";
import { Sparkline } from "./Sparkline";

const REFRESH: LiveRefreshOptions = { what: "overview", refreshMs: 60_000, settleMs: 2_000, minGapMs: 15_000 };

/** The overview's headers grow with the rest of the table on wide ward screens. */
function SortableHeader({ keys, sort, children }: { keys: SortKey[]; sort: SortState<SortKey>; children: React.ReactNode }) {
  return (
    <SharedHeader keys={keys} sort={sort} className="2xl:text-base">
      {children}
    </SharedHeader>
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
  const { data: overview, failedAt } = useLiveRefresh(initial.unit.id, url, initial, REFRESH);
  const tz = overview.unit.timeZone;

  const { sort, onSort } = useSort<SortKey>({ key: "bed", direction: "ascending" }, (k) => FIRST_DIRECTION[k] ?? "ascending");
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
          <RefreshFailedNotice failedAt={failedAt && formatClock(failedAt.toISOString(), tz)} dataOf={formatClock(overview.asOf, tz)} />
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
