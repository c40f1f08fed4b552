"use client";
// The zoom panel: the same heart rate at three scales. Over a long range it shows heart rate per bucket (mean line,
// lowest–highest band); at 15 min or less it is a tachogram of single beats, with the device's ectopic labels and the
// engine's cleaning marked by distinct shapes and explained in words. Buttons (whole night, 1 h, 5 min, earlier,
// later) make it work from the keyboard; dragging or the wheel on the heart-rate chart above does the same by mouse.
import { useMemo, useRef } from "react";
import useSWR from "swr";
import uPlot from "uplot";
import { median } from "@/lib/engine/stats";
import type { AnnotationDTO } from "@/lib/review/annotations";
import type { BeatsViewDTO, HeartRateBucketsDTO, SingleBeatsDTO } from "@/lib/review/beats-view";
import type { FlagViewDTO } from "@/lib/review/flags-view";
import { axisStyle, chartColours, UPlotChart } from "@/components/charts/UPlotChart";
import { drawAnnotations, drawFlags, offsetChanges, timeAxis, tzDate, withAlpha, type Colours } from "./chart-draw";
import { clock, clockSeconds, formatValue, spanWords } from "./format";
import { getJson } from "./fetch";
import type { ZoomRange } from "./TrendCharts";

/** Rows in the text alternative of a bucket view. */
const SUMMARY_ROWS = 12;
/** Marked beats listed in the text alternative of a tachogram. */
const MAX_LISTED_BEATS = 200;

const iso = (s: number) => new Date(Math.round(s * 1000)).toISOString();

const TYPE_WORDS: Record<SingleBeatsDTO["type"][number], string> = {
  N: "normal",
  V: "ventricular ectopic (V)",
  S: "supraventricular ectopic (S)",
  P: "paced (P)",
  "?": "unlabelled (?)",
};

const ACTION_WORDS: Record<SingleBeatsDTO["action"][number], string> = {
  kept: "kept as measured",
  interpolated: "interpolated",
  split: "split (missed beat)",
  merged: "merged (extra beat)",
  removed: "removed",
};

/** Beat markers, canvas px: the same shapes as the SVG legend below the chart. */
function drawBeatMarkers(u: uPlot, d: SingleBeatsDTO, c: Colours) {
  const { ctx } = u;
  const r = 4.5 * uPlot.pxRatio;
  ctx.save();
  ctx.lineWidth = 1.5 * uPlot.pxRatio;
  for (let i = 0; i < d.t.length; i++) {
    const x = u.valToPos(d.t[i]!, "x", true);
    const y = u.valToPos(d.hr[i]!, "y", true);
    const type = d.type[i]!;
    ctx.beginPath();
    if (type === "V") {
      ctx.moveTo(x, y - r * 1.2);
      ctx.lineTo(x + r, y + r * 0.8);
      ctx.lineTo(x - r, y + r * 0.8);
      ctx.closePath();
      ctx.fillStyle = c.ink;
      ctx.fill();
    } else if (type === "S") {
      ctx.moveTo(x, y - r * 1.2);
      ctx.lineTo(x + r, y);
      ctx.lineTo(x, y + r * 1.2);
      ctx.lineTo(x - r, y);
      ctx.closePath();
      ctx.fillStyle = c.ink;
      ctx.fill();
    } else if (type === "P") {
      ctx.moveTo(x - r, y);
      ctx.lineTo(x + r, y);
      ctx.moveTo(x, y - r);
      ctx.lineTo(x, y + r);
      ctx.strokeStyle = c.ink;
      ctx.stroke();
    } else if (type === "?") {
      ctx.arc(x, y, r * 0.7, 0, 2 * Math.PI);
      ctx.strokeStyle = c.muted;
      ctx.stroke();
    } else {
      ctx.arc(x, y, r * 0.45, 0, 2 * Math.PI);
      ctx.fillStyle = c.accent;
      ctx.fill();
    }
    if (d.edited[i]) {
      ctx.beginPath();
      ctx.strokeStyle = c.caution;
      ctx.strokeRect(x - r * 1.6, y - r * 1.6, r * 3.2, r * 3.2);
    }
  }
  ctx.restore();
}

function Legend({ d }: { d: SingleBeatsDTO }) {
  const count = (type: string) => d.type.filter((t) => t === type).length;
  const edited = d.edited.filter(Boolean).length;
  const items: { shape: React.ReactNode; text: string }[] = [
    { shape: <circle cx="8" cy="8" r="2.5" className="fill-accent" />, text: `normal beat (${count("N")})` },
    { shape: <path d="M8 2.5 L13 12 L3 12 Z" className="fill-ink" />, text: `ventricular ectopic, V (${count("V")})` },
    { shape: <path d="M8 2 L13 8 L8 14 L3 8 Z" className="fill-ink" />, text: `supraventricular ectopic, S (${count("S")})` },
    { shape: <path d="M3 8 H13 M8 3 V13" className="stroke-ink" strokeWidth="1.6" fill="none" />, text: `paced, P (${count("P")})` },
    { shape: <circle cx="8" cy="8" r="3.5" className="stroke-muted" strokeWidth="1.5" fill="none" />, text: `unlabelled by the device, ? (${count("?")})` },
    { shape: <rect x="2" y="2" width="12" height="12" className="stroke-caution" strokeWidth="1.6" fill="none" />, text: `edited by cleaning: not used as measured (${edited})` },
  ];
  return (
    <ul className="mt-2 flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Beat markers">
      {items.map((it) => (
        <li key={it.text} className="flex items-center gap-1.5">
          <svg aria-hidden="true" viewBox="0 0 16 16" className="h-4 w-4 shrink-0">{it.shape}</svg>
          {it.text}
        </li>
      ))}
    </ul>
  );
}

function BeatsTable({ d, timeZone }: { d: SingleBeatsDTO; timeZone: string }) {
  const marked = d.t.map((_, i) => i).filter((i) => d.type[i] !== "N" || d.edited[i]);
  const shown = marked.slice(0, MAX_LISTED_BEATS);
  const hrs = d.hr.filter((_, i) => !d.edited[i]);
  return (
    <details className="mt-2 text-sm">
      <summary className="cursor-pointer text-accent">Table: beats in this range</summary>
      <p className="mt-2 text-muted">
        {d.t.length} beats; heart rate of the beats kept as measured: median {formatValue(hrs.length ? median(hrs) : null, 0)}/min, lowest{" "}
        {formatValue(hrs.length ? Math.min(...hrs) : null, 0)}, highest {formatValue(hrs.length ? Math.max(...hrs) : null, 0)}. {marked.length} beats are
        ectopic, paced, unlabelled or edited{marked.length > shown.length ? `; the first ${shown.length} are listed` : ""}.
      </p>
      {shown.length > 0 && (
        <table className="mt-2">
          <caption className="sr-only">Marked beats: time, interval, rate, device label and what cleaning did</caption>
          <thead>
            <tr>
              <th scope="col">Time</th>
              <th scope="col">RR (ms)</th>
              <th scope="col">Rate (/min)</th>
              <th scope="col">Device label</th>
              <th scope="col">Cleaning</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((i) => (
              <tr key={i}>
                <th scope="row" className="font-mono font-normal text-ink">{clockSeconds(d.t[i]!, timeZone)}</th>
                <td className="font-mono">{formatValue(d.rr[i], 0)}</td>
                <td className="font-mono">{formatValue(d.hr[i], 0)}</td>
                <td>{TYPE_WORDS[d.type[i]!]}</td>
                <td>{d.label[i] === "normal" ? ACTION_WORDS[d.action[i]!] : `${d.label[i]!.replace(/_/g, " ")}: ${ACTION_WORDS[d.action[i]!]}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </details>
  );
}

function BucketsTable({ d, timeZone }: { d: HeartRateBucketsDTO; timeZone: string }) {
  const rows = useMemo(() => {
    const per = Math.max(1, Math.ceil(d.t.length / SUMMARY_ROWS));
    const out: { fromS: number; toS: number; median: number | null; low: number | null; high: number | null; beats: number }[] = [];
    for (let i = 0; i < d.t.length; i += per) {
      const idx = d.t.slice(i, i + per).map((_, k) => i + k);
      const means = idx.map((k) => d.mean[k]).filter((v): v is number => v != null);
      const lows = idx.map((k) => d.min[k]).filter((v): v is number => v != null);
      const highs = idx.map((k) => d.max[k]).filter((v): v is number => v != null);
      out.push({
        fromS: Math.max(d.t[i]!, Date.parse(d.from) / 1000),
        toS: Math.min(d.t[Math.min(i + per, d.t.length) - 1]! + d.bucketS, Date.parse(d.to) / 1000),
        median: means.length ? median(means) : null,
        low: lows.length ? Math.min(...lows) : null,
        high: highs.length ? Math.max(...highs) : null,
        beats: idx.reduce((s, k) => s + d.n[k]!, 0),
      });
    }
    return out;
  }, [d]);
  return (
    <details className="mt-2 text-sm">
      <summary className="cursor-pointer text-accent">Table: heart rate in this range</summary>
      <table className="mt-2">
        <caption className="sr-only">Heart rate in parts of the range: median of the {d.bucketS}-s bucket means, lowest and highest</caption>
        <thead>
          <tr>
            <th scope="col">From – to</th>
            <th scope="col">Median of {d.bucketS}-s means (/min)</th>
            <th scope="col">Lowest</th>
            <th scope="col">Highest</th>
            <th scope="col">Beats</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.fromS}>
              <th scope="row" className="font-normal text-ink">{clock(r.fromS, timeZone)} – {clock(r.toS, timeZone)}</th>
              <td className="font-mono">{formatValue(r.median, 0)}</td>
              <td className="font-mono">{formatValue(r.low, 0)}</td>
              <td className="font-mono">{formatValue(r.high, 0)}</td>
              <td>{r.beats || "none"}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}

interface ZoomControls {
  whole: () => void;
  span: (seconds: number) => void;
  step: (direction: 1 | -1) => void;
}

export function ZoomPanel({ stayId, timeZone, night, range, controls, flags, annotations, asOfS }: {
  stayId: string;
  timeZone: string;
  night: ZoomRange;
  range: ZoomRange;
  controls: ZoomControls;
  flags: FlagViewDTO[];
  annotations: AnnotationDTO[];
  asOfS: number;
}) {
  const url = `/api/stays/${stayId}/beats?from=${encodeURIComponent(iso(range.fromS))}&to=${encodeURIComponent(iso(range.toS))}`;
  const { data, error, isLoading } = useSWR<BeatsViewDTO>(url, getJson, { keepPreviousData: true, revalidateOnFocus: false });
  const dataRef = useRef(data);
  dataRef.current = data;
  const rangeRef = useRef(range);
  rangeRef.current = range;
  const mode = data?.mode ?? null;
  const bucketS = data?.mode === "buckets" ? data.bucketS : 0;

  const options = useMemo((): Omit<uPlot.Options, "width"> | null => {
    if (!mode) return null;
    const c = chartColours();
    const showZone = offsetChanges(night.fromS, night.toS, timeZone);
    const xRange = (): [number, number] => {
      const d = dataRef.current;
      return d ? [Date.parse(d.from) / 1000, Date.parse(d.to) / 1000] : [rangeRef.current.fromS, rangeRef.current.toS];
    };
    const rate = (_u: uPlot, v: number | null) => (v == null ? "—" : `${v.toFixed(0)}/min`);
    const common = {
      height: 220,
      padding: [8, 40, 0, 0] as uPlot.Padding,
      tzDate: tzDate(timeZone),
      legend: { live: true },
      axes: [timeAxis(c, timeZone, showZone, mode === "beats"), { ...axisStyle(c), size: 52, label: "Heart rate (/min)" }],
    };
    const overlays = (u: uPlot) => {
      drawFlags(u, flags, asOfS, c, true);
      drawAnnotations(u, annotations, c, true);
    };
    if (mode === "beats") {
      return {
        ...common,
        scales: { x: { time: true, range: xRange }, y: { range: (_u, lo, hi) => [Math.floor(((Number.isFinite(lo) ? lo : 60) - 5) / 5) * 5, Math.ceil(((Number.isFinite(hi) ? hi : 100) + 5) / 5) * 5] } },
        series: [
          { label: "Beat", value: (_u, v) => (v == null ? "—" : clockSeconds(v, timeZone)) },
          { label: "Heart rate per beat (60000 / RR)", stroke: withAlpha(c.accent, 0.7), width: 1, points: { show: false }, value: rate },
        ],
        hooks: {
          draw: [
            (u) => {
              overlays(u);
              const d = dataRef.current;
              if (d?.mode === "beats") drawBeatMarkers(u, d, c);
            },
          ],
        },
      };
    }
    return {
      ...common,
      scales: { x: { time: true, range: xRange } },
      series: [
        { label: "Bucket", value: (_u, v) => (v == null ? "—" : clock(v, timeZone)) },
        { label: `Highest in ${bucketS} s`, stroke: c.muted, width: 1, dash: [3, 3], value: rate },
        { label: `Mean heart rate per ${bucketS} s`, stroke: c.accent, width: 1.5, value: rate },
        { label: `Lowest in ${bucketS} s`, stroke: c.muted, width: 1, dash: [3, 3], value: rate },
      ],
      bands: [{ series: [1, 3], fill: withAlpha(c.accent, 0.14) }],
      hooks: { draw: [overlays] },
    };
    // The range comes through the refs: rebuilding the chart on every range change would lose the cursor.
  }, [mode, bucketS, timeZone, night.fromS, night.toS, flags, annotations, asOfS]);

  const chartData = useMemo((): uPlot.AlignedData | null => {
    if (!data) return null;
    if (data.mode === "beats") return [data.t, data.hr];
    const x = data.t.map((t) => t + data.bucketS / 2);
    return [x, data.max, data.mean, data.min];
  }, [data]);

  const spanS = range.toS - range.fromS;
  const atStart = range.fromS <= night.fromS + 1;
  const atEnd = range.toS >= night.toS - 1;
  const whole = spanS >= night.toS - night.fromS - 1;
  const scaleWords = data
    ? data.mode === "beats"
      ? "single beats (tachogram)"
      : `heart rate per ${data.bucketS}-s bucket`
    : "loading";

  return (
    <section aria-labelledby="zoom-heading" className="card p-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id="zoom-heading">Zoom: heart rate at 8 h, 1 h and 5 min</h2>
        <div role="group" aria-label="Zoom range" className="flex flex-wrap gap-2">
          <button type="button" className="btn-secondary aria-pressed:border-accent" onClick={controls.whole} aria-pressed={whole}>Whole night</button>
          <button type="button" className="btn-secondary aria-pressed:border-accent" onClick={() => controls.span(3600)} aria-pressed={Math.abs(spanS - 3600) < 1}>1 h</button>
          <button type="button" className="btn-secondary aria-pressed:border-accent" onClick={() => controls.span(300)} aria-pressed={Math.abs(spanS - 300) < 1}>5 min</button>
          <button type="button" className="btn-secondary" onClick={() => controls.step(-1)} disabled={atStart}>
            <span aria-hidden="true">←</span> Earlier
          </button>
          <button type="button" className="btn-secondary" onClick={() => controls.step(1)} disabled={atEnd}>
            Later <span aria-hidden="true">→</span>
          </button>
        </div>
      </div>
      <p className="mt-1 text-sm text-muted" aria-live="polite">
        {clock(range.fromS, timeZone)} – {clock(range.toS, timeZone)} ({spanWords(spanS)}): {scaleWords}
        {isLoading && data ? " · updating" : ""}
        {error ? ` · could not load: ${(error as Error).message}` : ""}
      </p>
      <p className="text-xs text-muted">
        1 h and 5 min centre on the last point you pointed at in the charts above, else on this range. Drag across the heart-rate chart, or
        scroll over it, to choose a range there.
      </p>
      {options && chartData ? (
        <UPlotChart options={options} data={chartData} className="mt-2" />
      ) : (
        <div className="mt-2 flex h-56 items-center justify-center text-muted">{error ? "No data." : "Loading heart rate…"}</div>
      )}
      {data?.mode === "beats" && (
        <>
          <Legend d={data} />
          <BeatsTable d={data} timeZone={timeZone} />
        </>
      )}
      {data?.mode === "buckets" && <BucketsTable d={data} timeZone={timeZone} />}
    </section>
  );
}
