"use client";
// The Night review's client part: the night's data through SWR (first rendered on the server, refreshed every 5 min
// while the night is in progress), the stacked trend charts, the zoom panel and its range, the flag table and the
// clinical events. The zoom range lives here because the heart-rate chart, the zoom buttons and the tables all set it.
import { useCallback, useMemo, useRef, useState } from "react";
import useSWR from "swr";
import type { NightDTO } from "@/lib/review/night-windows";
import { AnnotationsSection } from "./AnnotationsSection";
import { ChartKey } from "./ChartKey";
import { getJson } from "./fetch";
import { FlagTable } from "./FlagTable";
import { TrendCharts, type ZoomRange } from "./TrendCharts";
import { ZoomPanel } from "./ZoomPanel";

const REFRESH_MS = 5 * 60_000;
const MIN_SPAN_S = 5 * 60;
/** Wheel steps on the heart-rate chart, s; the whole night is the last step. */
const WHEEL_SPANS_S = [5 * 60, 15 * 60, 3600, 2 * 3600, 4 * 3600];

interface NightStay {
  stayId: string;
  admittedAt: string;
  dischargedAt: string | null;
}

export function NightReview({ initial, stay, canAnnotate }: { initial: NightDTO; stay: NightStay; canAnnotate: boolean }) {
  const url = `/api/stays/${stay.stayId}/night?night=${initial.night.night}`;
  // The server's clock (asOf), not the browser's, decides whether the night is still in progress.
  const inProgress = Date.parse(initial.night.to) > Date.parse(initial.asOf);
  const { data, error, mutate } = useSWR<NightDTO>(url, getJson, {
    fallbackData: initial,
    refreshInterval: inProgress ? REFRESH_MS : 0,
    revalidateOnFocus: false,
    revalidateOnMount: false,
  });
  const dto = data ?? initial;
  const tz = dto.timeZone;
  const night = useMemo<ZoomRange>(() => ({ fromS: Date.parse(dto.night.from) / 1000, toS: Date.parse(dto.night.to) / 1000 }), [dto.night.from, dto.night.to]);
  const nightS = night.toS - night.fromS;
  const asOfS = Math.min(night.toS, Date.parse(dto.asOf) / 1000);

  const [range, setRange] = useState<ZoomRange>(night);
  /** The last time pointed at in the trend charts, epoch s: the centre of the next "1 h" or "5 min". */
  const cursorRef = useRef<number | null>(null);

  const place = useCallback(
    (centreS: number, spanS: number): ZoomRange => {
      const span = Math.min(Math.max(spanS, MIN_SPAN_S), nightS);
      const from = Math.min(Math.max(centreS - span / 2, night.fromS), night.toS - span);
      return { fromS: from, toS: from + span };
    },
    [night, nightS],
  );
  const centre = () => {
    const c = cursorRef.current ?? (range.fromS + range.toS) / 2;
    cursorRef.current = null;
    return c;
  };
  const controls = {
    whole: () => setRange(night),
    span: (s: number) => setRange(place(centre(), s)),
    step: (direction: 1 | -1) => {
      cursorRef.current = null;
      setRange((r) => place((r.fromS + r.toS) / 2 + direction * ((r.toS - r.fromS) / 2), r.toS - r.fromS));
    },
  };
  const onSelect = useCallback((a: number, b: number) => setRange(place((a + b) / 2, Math.abs(b - a))), [place]);
  const onWheel = useCallback(
    (direction: 1 | -1, centreS: number) =>
      setRange((r) => {
        const spans = [...WHEEL_SPANS_S.filter((s) => s < nightS), nightS];
        const span = r.toS - r.fromS;
        // The step nearest the current span, then one step in (wheel up) or out (wheel down).
        let i = 0;
        spans.forEach((s, k) => Math.abs(s - span) < Math.abs(spans[i]! - span) && (i = k));
        const next = spans[Math.min(spans.length - 1, Math.max(0, i + direction))]!;
        return place(centreS, next);
      }),
    [place, nightS],
  );
  const show = useCallback((fromS: number, toS: number) => setRange(place((fromS + toS) / 2, Math.max(toS - fromS, MIN_SPAN_S))), [place]);

  const reload = useCallback(() => void mutate(), [mutate]);
  const coverage = dto.coverage.share;
  return (
    <div className="space-y-5">
      <section aria-label="This night at a glance" className="card flex flex-wrap gap-x-8 gap-y-2 p-4 text-sm">
        <p>
          <span className="text-muted">Usable signal: </span>
          <span className="font-bold">{coverage === null ? "no data yet" : `${Math.round(coverage * 100)} %`}</span>
          {coverage !== null && <span className="text-muted"> of the night so far in bed</span>}
        </p>
        <p>
          <span className="text-muted">5-min windows with a value: </span>
          <span className="font-bold">{dto.coverage.usableWindows}</span> of {dto.coverage.windows}
        </p>
        <p>
          <span className="text-muted">Flags: </span>
          <span className="font-bold">{dto.flags.length}</span>
          <span className="text-muted"> · Events: </span>
          <span className="font-bold">{dto.annotations.length}</span>
        </p>
        <p className="text-muted">
          Engine {dto.algorithmVersion}
          {inProgress ? " · night in progress, refreshed every 5 min" : ""}
          {error ? " · could not refresh; showing the last data read" : ""}
        </p>
      </section>

      <section aria-labelledby="trends-heading" className="card space-y-4 p-4">
        <div>
          <h2 id="trends-heading">Trends through the night</h2>
          <p className="text-sm text-muted">
            Times in {tz}. Point at a chart to read every chart at that time; click to open that 5-min window in Window detail. The
            flag table and the tables under each chart reach the same windows from the keyboard.
          </p>
        </div>
        <ChartKey />
        {dto.short.t.length === 0 && dto.long.t.length === 0 && (
          <p className="rounded-md border border-line p-3 text-muted">No windows have been computed for this night.</p>
        )}
        <TrendCharts dto={dto} range={range} onSelect={onSelect} onWheel={onWheel} cursorRef={cursorRef} />
      </section>

      <ZoomPanel
        stayId={dto.stayId}
        timeZone={tz}
        night={night}
        range={range}
        controls={controls}
        flags={dto.flags}
        annotations={dto.annotations}
        asOfS={asOfS}
      />

      <div className="space-y-5">
        <FlagTable stayId={dto.stayId} flags={dto.flags} timeZone={tz} untilS={asOfS} onShow={show} />
        <AnnotationsSection
          stayId={dto.stayId}
          timeZone={tz}
          annotations={dto.annotations}
          canAnnotate={canAnnotate}
          minAt={stay.admittedAt}
          maxAt={stay.dischargedAt ?? dto.asOf}
          onChanged={reload}
          onShow={(c) => setRange(place(c, 3600))}
        />
      </div>
    </div>
  );
}
