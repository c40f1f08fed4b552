"use client";
// One device's Stream health tab: the latest figures as a definition list, the 24-h charts, and the hourly table that
// carries every charted figure as text. Kept current with SWR (every minute, and soon after a live "stream" event of
// this device).
import { useCallback, useEffect, useRef } from "react";
import useSWR from "swr";
import { StreamStateTag } from "@/components/devices/StreamStateTag";
import { useLiveEvents, type LiveEvent } from "@/components/live/useLiveEvents";
import type { DeviceHealthSeriesDTO } from "@/lib/devices/health";
import { formatAge, formatDrift, formatInstant, formatOffset, formatRate, formatSeconds, plural } from "./format";
import { HealthCharts } from "./HealthCharts";
import { clockOf, hourlyRows } from "./series";

const REFRESH_MS = 60_000;
const EVENT_SETTLE_MS = 2_000;

async function fetchSeries(url: string): Promise<DeviceHealthSeriesDTO> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) throw new Error(`device health request failed (${res.status})`);
  return (await res.json()) as DeviceHealthSeriesDTO;
}

function Figures({ s }: { s: DeviceHealthSeriesDTO }) {
  const r = s.latest;
  const kinds = Object.entries(r.malformedByKind).filter(([, n]) => n > 0);
  const item = (term: string, desc: React.ReactNode) => (
    <div className="border-b border-line py-2 sm:grid sm:grid-cols-[16rem_1fr] sm:gap-4">
      <dt className="text-muted">{term}</dt>
      <dd>{desc}</dd>
    </div>
  );
  return (
    <dl>
      {item("Stream", <StreamStateTag state={r.state} detail={r.notStreamingBecause ?? (r.trouble.tier === "troubled" ? "many events in 24 h" : undefined)} />)}
      {item(
        "Last beat",
        r.lastBeatAt ? (
          <>
            {formatAge(r.lastBeatAt, s.asOf)} · <time dateTime={r.lastBeatAt}>{formatInstant(r.lastBeatAt, s.timeZone, s.asOf)}</time>
          </>
        ) : (
          "never"
        ),
      )}
      {item("Beats received per minute", <><span className="font-mono">{formatRate(r.beatsPerMinute)}</span> <span className="text-muted">over the last 5 min</span></>)}
      {item(
        "Gaps, last 24 h",
        <>
          {plural(r.gaps, "gap")}, {plural(r.missingRecords, "record")} never delivered · longest time between two stored beats:{" "}
          {r.longestGapS === null ? "—" : formatSeconds(r.longestGapS)}
        </>,
      )}
      {item("Duplicates, last 24 h", r.duplicates.toLocaleString("en"))}
      {item(
        "Malformed events, last 24 h",
        <>
          {r.malformed.toLocaleString("en")}
          {kinds.length > 0 && (
            <span className="text-muted"> · by kind since counting began: {kinds.map(([k, n]) => `${k.replaceAll("_", " ")} ${n}`).join(", ")}</span>
          )}
        </>,
      )}
      {item("Reconnects, last 24 h", r.reconnects.toLocaleString("en"))}
      {item("Clock offset now", <><span className="font-mono">{formatOffset(r.clockOffsetMs)}</span> <span className="text-muted">device clock minus server clock</span></>)}
      {item(
        "Clock drift",
        r.drift.msPerHour !== null ? (
          <>
            <span className="font-mono">{formatDrift(r.drift.msPerHour)}</span>{" "}
            <span className="text-muted">least-squares slope over {plural(r.drift.samples, "minute sample")} spanning {formatSeconds(r.drift.spanMinutes * 60)}</span>
          </>
        ) : (
          <span className="text-muted">{r.drift.reason}</span>
        ),
      )}
    </dl>
  );
}

function HourlyTable({ s }: { s: DeviceHealthSeriesDTO }) {
  const rows = hourlyRows(s);
  return (
    <details className="text-sm">
      <summary className="cursor-pointer text-accent">Table: the last 24 h by hour</summary>
      <div className="overflow-x-auto">
        <table className="mt-2">
          <caption className="sr-only">Stream figures of this device for each hour of the last 24 h</caption>
          <thead>
            <tr>
              <th scope="col">Hour</th>
              <th scope="col">Beats received</th>
              <th scope="col">Minutes without a beat</th>
              <th scope="col">Gaps</th>
              <th scope="col">Duplicates</th>
              <th scope="col">Malformed</th>
              <th scope="col">Reconnects</th>
              <th scope="col">Last clock offset</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((h) => (
              <tr key={h.fromS}>
                <th scope="row" className="font-normal text-ink">{clockOf(h.fromS, s.timeZone)} – {clockOf(h.toS, s.timeZone)}</th>
                <td className="font-mono">{h.beats.toLocaleString("en")}</td>
                <td>{h.minutesWithoutBeats}</td>
                <td>{h.gaps}</td>
                <td>{h.duplicates}</td>
                <td>{h.malformed}</td>
                <td>{h.reconnects}</td>
                <td className="font-mono">{formatOffset(h.lastOffsetMs)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}

export function DeviceHealthView({ initial, unitId }: { initial: DeviceHealthSeriesDTO; unitId: string }) {
  const url = `/api/units/${unitId}/devices/${initial.deviceId}/health`;
  const { data, mutate, error } = useSWR(url, fetchSeries, {
    fallbackData: initial,
    refreshInterval: REFRESH_MS,
    revalidateOnFocus: false,
    revalidateOnMount: false,
    keepPreviousData: true,
  });
  const s = data ?? initial;
  const pending = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(pending.current), []);
  const onLive = useCallback(
    (e: LiveEvent) => {
      if (e.type !== "stream" || e.deviceId !== initial.deviceId || pending.current) return;
      pending.current = setTimeout(() => {
        pending.current = undefined;
        void mutate();
      }, EVENT_SETTLE_MS);
    },
    [mutate, initial.deviceId],
  );
  useLiveEvents(unitId, onLive);

  return (
    <div className="space-y-5">
      <section aria-labelledby="device-health-heading" className="space-y-2">
        <div className="flex flex-wrap items-baseline justify-between gap-x-4">
          <h2 id="device-health-heading">Stream health</h2>
          <p className="text-sm text-muted">
            As of <time dateTime={s.asOf}>{formatInstant(s.asOf, s.timeZone, s.asOf)}</time> · refreshes every minute
          </p>
        </div>
        <div role="status">
          {error && (
            <p className="rounded-md border border-problem bg-problem-surface px-2 py-1 text-sm">
              <span className="font-bold">Refresh failed</span>; showing the figures as of {formatInstant(s.asOf, s.timeZone, s.asOf)}.
            </p>
          )}
        </div>
        <Figures s={s} />
      </section>
      <section aria-labelledby="device-health-charts" className="card space-y-3 p-4">
        <h2 id="device-health-charts">Last 24 hours</h2>
        <HealthCharts s={s} />
        <HourlyTable s={s} />
      </section>
    </div>
  );
}
