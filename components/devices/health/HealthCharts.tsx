"use client";
// The 24-h charts of one device's stream: beats received per minute, stream events per 10 min, and the clock offset
// with its least-squares line. Each chart has a sentence saying what it shows; the hourly table below them carries
// every figure (the canvases are hidden from assistive technology). Series are told apart by dash pattern and legend
// text as well as colour.
import { useMemo } from "react";
import uPlot from "uplot";
import { axisStyle, chartColours, UPlotChart } from "@/components/charts/UPlotChart";
import { offsetChanges, timeAxis, tzDate } from "@/components/night/chart-draw";
import type { DeviceHealthSeriesDTO } from "@/lib/devices/health";
import { formatDrift, formatOffset, plural } from "./format";
import { median } from "@/lib/engine/stats";
import { clockOf, EVENT_KINDS, eventBuckets } from "./series";

const HEIGHT = 150;
const BUCKET_MINUTES = 10;

function frame(s: DeviceHealthSeriesDTO) {
  const fromS = s.t[0]!;
  return { fromS, toS: fromS + s.t.length * 60, tz: s.timeZone };
}

function baseOptions(s: DeviceHealthSeriesDTO, yLabel: string): Omit<uPlot.Options, "width" | "series"> {
  const c = chartColours();
  const { fromS, toS, tz } = frame(s);
  return {
    height: HEIGHT,
    padding: [8, 40, 0, 0],
    tzDate: tzDate(tz),
    scales: { x: { time: true, range: () => [fromS, toS] } },
    axes: [timeAxis(c, tz, offsetChanges(fromS, toS, tz)), { ...axisStyle(c), size: 56, label: yLabel, labelSize: 18 }],
    legend: { live: true },
    cursor: { sync: { key: `device-health-${s.deviceId}` }, drag: { x: false, y: false, setScale: false } },
  };
}

function ChartSection({ id, title, summary, children }: { id: string; title: string; summary: string; children: React.ReactNode }) {
  return (
    <section aria-labelledby={id} className="border-t border-line pt-3 first:border-t-0 first:pt-0">
      <h3 id={id} className="font-bold">{title}</h3>
      <p className="text-sm text-muted">{summary}</p>
      {children}
    </section>
  );
}

function BeatsChart({ s }: { s: DeviceHealthSeriesDTO }) {
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    return {
      ...baseOptions(s, "per minute"),
      scales: { ...baseOptions(s, "").scales, y: { range: (_u, _min, max) => [0, Math.max(10, (Number.isFinite(max) ? max : 0) * 1.1)] } },
      series: [
        { label: "Minute", value: (_u, v) => (v == null ? "—" : clockOf(v, s.timeZone)) },
        { label: "Beats received", stroke: c.accent, width: 1.5, value: (_u, v) => (v == null ? "—" : String(v)) },
      ],
    };
  }, [s]);
  const data = useMemo((): uPlot.AlignedData => [s.t, s.beats], [s]);
  const withBeats = s.beats.filter((n) => n > 0);
  const empty = s.beats.length - withBeats.length;
  const summary = withBeats.length
    ? `Median ${median(withBeats)} beats received per minute over the minutes with any, highest ${Math.max(...withBeats)}; ${plural(empty, "minute")} of the 24 h without a beat.`
    : "No beat received in the last 24 h.";
  return (
    <ChartSection id="chart-beats" title="Beats received per minute" summary={summary}>
      <UPlotChart options={options} data={data} />
    </ChartSection>
  );
}

function EventsChart({ s }: { s: DeviceHealthSeriesDTO }) {
  const buckets = useMemo(() => eventBuckets(s, BUCKET_MINUTES), [s]);
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    const stroke = { gaps: c.accent, duplicates: c.caution, malformed: c.fine, reconnects: c.ink } as const;
    const dash = { gaps: undefined, duplicates: [8, 4], malformed: [2, 3], reconnects: [10, 3, 2, 3] } as const;
    return {
      ...baseOptions(s, `per ${BUCKET_MINUTES} min`),
      scales: { ...baseOptions(s, "").scales, y: { range: (_u, _min, max) => [0, Math.max(4, (Number.isFinite(max) ? max : 0) + 1)] } },
      series: [
        { label: `${BUCKET_MINUTES} min from`, value: (_u, v) => (v == null ? "—" : clockOf(v, s.timeZone)) },
        ...EVENT_KINDS.map(({ key, label }) => ({
          label,
          stroke: stroke[key],
          width: 1.75,
          ...(dash[key] && { dash: [...dash[key]] }),
          paths: uPlot.paths.stepped!({ align: 1 }),
          value: (_u: uPlot, v: number | null) => (v == null ? "—" : String(v)),
        })),
      ],
    };
  }, [s]);
  const data = useMemo((): uPlot.AlignedData => [buckets.t, ...EVENT_KINDS.map(({ key }) => buckets[key])], [buckets]);
  const totals = EVENT_KINDS.map(({ key, label }) => `${s[key].reduce((a, b) => a + b, 0)} ${label.toLowerCase()}`);
  const busiest = buckets.t.reduce<{ t: number; n: number }>((best, t, i) => {
    const n = EVENT_KINDS.reduce((a, { key }) => a + buckets[key][i]!, 0);
    return n > best.n ? { t, n } : best;
  }, { t: 0, n: 0 });
  const summary = `In the last 24 h: ${totals.join(", ")}.${busiest.n ? ` Busiest ${BUCKET_MINUTES} min from ${clockOf(busiest.t, s.timeZone)}, with ${plural(busiest.n, "event")}.` : ""}`;
  return (
    <ChartSection id="chart-events" title={`Stream events per ${BUCKET_MINUTES} min`} summary={summary}>
      <UPlotChart options={options} data={data} />
      <p className="text-xs text-muted">Lines: gaps solid, duplicates dashed, malformed dotted, reconnects dash-dot.</p>
    </ChartSection>
  );
}

function OffsetChart({ s }: { s: DeviceHealthSeriesDTO }) {
  const { drift } = s.latest;
  const { fromS } = frame(s);
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    return {
      ...baseOptions(s, "ms"),
      series: [
        { label: "Minute", value: (_u, v) => (v == null ? "—" : clockOf(v, s.timeZone)) },
        { label: "Clock offset (ms)", stroke: c.accent, width: 1.5, points: { show: false }, value: (_u, v) => formatOffset(v ?? null) },
        { label: "Least-squares line", stroke: c.fine, width: 1.5, dash: [6, 4], points: { show: false }, value: (_u, v) => formatOffset(v ?? null) },
      ],
    };
  }, [s]);
  const data = useMemo((): uPlot.AlignedData => {
    const fit = drift.msPerHour !== null && drift.interceptMs !== null
      ? s.t.map((t) => drift.interceptMs! + drift.msPerHour! * ((t - fromS) / 3600))
      : s.t.map(() => null);
    return [s.t, s.clockOffsetMs, fit];
  }, [s, drift, fromS]);
  const measured = s.clockOffsetMs.filter((v): v is number => v !== null);
  const range = measured.length
    ? `Clock offset from ${formatOffset(Math.min(...measured))} to ${formatOffset(Math.max(...measured))} over ${plural(measured.length, "minute")} with a measurement.`
    : "No clock offset measured in the last 24 h.";
  const summary = `${range} ${drift.msPerHour !== null ? `Drift ${formatDrift(drift.msPerHour)} (least-squares slope over ${drift.spanMinutes} min).` : `No drift: ${drift.reason}`}`;
  return (
    <ChartSection id="chart-offset" title="Clock offset (ms)" summary={summary}>
      <UPlotChart options={options} data={data} />
    </ChartSection>
  );
}

export function HealthCharts({ s }: { s: DeviceHealthSeriesDTO }) {
  return (
    <div className="space-y-3">
      <BeatsChart s={s} />
      <EventsChart s={s} />
      <OffsetChart s={s} />
    </div>
  );
}
