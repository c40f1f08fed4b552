"use client";
// The Night review's stacked trend charts: one chart per index on one shared time axis (the night), with a synced
// cursor. Each draws the own-baseline band, flagged spans (hatched, outlined, tagged with the severity word),
// gaps where a window was unusable (with a dotted line saying so), and clinical events. Clicking a chart opens the
// 5-min window under the cursor in Window detail; on the heart-rate chart, dragging or the mouse wheel chooses the
// zoom panel's range. Every chart has a table alternative below it (the canvas is hidden from assistive technology).
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect, useMemo, useRef, type RefObject } from "react";
import type uPlot from "uplot";
import { median } from "@/lib/engine/stats";
import type { FlagViewDTO } from "@/lib/review/flags-view";
import type { NightDTO, NightKey, WindowColumns } from "@/lib/review/night-windows";
import { axisStyle, chartColours, UPlotChart } from "@/components/charts/UPlotChart";
import { drawAnnotations, drawBaselineBand, drawFlags, drawRange, drawUnusable, offsetChanges, timeAxis, tzDate, withAlpha } from "./chart-draw";
import { CHART_KEYS, clock, formatValue, INDEX_META, nearestIndex, windowHref } from "./format";

export interface ZoomRange {
  fromS: number;
  toS: number;
}

interface ChartProps {
  dto: NightDTO;
  index: NightKey;
  syncKey: string;
  /** The heart-rate chart also chooses the zoom range and shows it. */
  zoom?: { range: ZoomRange; onSelect: (fromS: number, toS: number) => void; onWheel: (direction: 1 | -1, centreS: number) => void };
  cursorRef: RefObject<number | null>;
}

const HOUR_S = 3600;

/** Columns of the window kind an index is computed on. */
const columnsOf = (dto: NightDTO, index: NightKey): WindowColumns<string> => (INDEX_META[index].kind === "short" ? dto.short : dto.long);

/** Flags drawn on an index's chart: its own, and those of rules not tied to a drawn index (data quality). */
function flagsFor(index: NightKey, flags: readonly FlagViewDTO[]): FlagViewDTO[] {
  return flags.filter((f) => f.index === index || f.index === null || !CHART_KEYS.includes(f.index as NightKey));
}

/**
 * Chart columns with a break (null) wherever consecutive windows are further apart than 1.5 strides, so a line never
 * joins across missing windows; plus the limited-quality values alone (drawn as hollow points).
 */
function chartData(cols: WindowColumns<string>, index: NightKey, strideS: number): uPlot.AlignedData {
  const x: number[] = [];
  const y: (number | null)[] = [];
  const limited: (number | null)[] = [];
  const values = cols.values[index]!;
  cols.t.forEach((t, i) => {
    if (i > 0 && t - cols.t[i - 1]! > 1.5 * strideS) {
      x.push((t + cols.t[i - 1]!) / 2);
      y.push(null);
      limited.push(null);
    }
    x.push(t);
    y.push(values[i]!);
    limited.push(cols.grade[i] === "limited" ? values[i]! : null);
  });
  return [x, y, limited, x.map(() => null)];
}

/** Stretches of consecutive unusable windows, from the last plotted window before to the first after. */
function unusableSpans(cols: WindowColumns<string>): [number, number][] {
  const out: [number, number][] = [];
  let i = 0;
  while (i < cols.grade.length) {
    if (cols.grade[i] !== "unusable") {
      i++;
      continue;
    }
    let j = i;
    while (j + 1 < cols.grade.length && cols.grade[j + 1] === "unusable") j++;
    out.push([i > 0 ? cols.t[i - 1]! : cols.start[i]!, j + 1 < cols.t.length ? cols.t[j + 1]! : cols.t[j]!]);
    i = j + 1;
  }
  return out;
}

function TrendChart({ dto, index, syncKey, zoom, cursorRef, onDrawn }: ChartProps & { onDrawn: () => void }) {
  const router = useRouter();
  const meta = INDEX_META[index];
  const cols = columnsOf(dto, index);
  const rangeRef = useRef(zoom?.range ?? null);
  rangeRef.current = zoom?.range ?? null;
  const zoomRef = useRef(zoom);
  zoomRef.current = zoom;
  const dtoRef = useRef(dto);
  dtoRef.current = dto;
  const chart = useRef<uPlot | null>(null);

  const data = useMemo(() => chartData(cols, index, meta.kind === "short" ? 60 : HOUR_S), [cols, index, meta.kind]);
  const isHr = zoom !== undefined;

  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    const tz = dto.timeZone;
    const fromS = Date.parse(dto.night.from) / 1000;
    const toS = Date.parse(dto.night.to) / 1000;
    const untilS = Math.min(toS, Date.parse(dto.asOf) / 1000);
    const baseline = dto.baselines[index];
    const flags = flagsFor(index, dto.flags);
    const spans = unusableSpans(cols);
    const fmt = (v: number | null | undefined) => formatValue(v, meta.digits);
    return {
      height: 150,
      // Room on the right for the last time label.
      padding: [8, 40, 0, 0],
      tzDate: tzDate(tz),
      scales: {
        x: { time: true, range: () => [fromS, toS] },
        y: {
          // The band stays in view even when the night's values have moved far from it.
          range: (_u, min, max) => {
            // uPlot passes non-finite bounds when the night has no value yet.
            let lo = Number.isFinite(min) ? min : (baseline?.median ?? 0);
            let hi = Number.isFinite(max) ? max : (baseline?.median ?? 1);
            if (baseline) {
              lo = Math.min(lo, baseline.median - (baseline.spread ?? 0));
              hi = Math.max(hi, baseline.median + (baseline.spread ?? 0));
            }
            const pad = (hi - lo || Math.abs(hi) || 1) * 0.08;
            return [lo - pad, hi + pad];
          },
        },
      },
      axes: [timeAxis(c, tz, offsetChanges(fromS, toS, tz)), { ...axisStyle(c), size: 52 }],
      series: [
        { label: "Window end", value: (_u, v) => (v == null ? "—" : clock(v, tz)) },
        {
          label: `${meta.short}${meta.unit ? ` (${meta.unit})` : ""}`,
          stroke: c.accent,
          width: 1.5,
          points: { show: meta.kind === "long", size: 7, fill: c.accent, stroke: c.accent },
          value: (_u, v) => fmt(v),
        },
        {
          label: "Limited signal (hollow)",
          stroke: c.muted,
          width: 1.5,
          paths: () => null,
          points: { show: true, size: 7, stroke: c.muted, fill: c.panel, width: 1.5 },
          value: (_u, v) => fmt(v),
        },
        {
          label: "Own baseline, median ± spread",
          stroke: c.fine,
          fill: withAlpha(c.fine, 0.16),
          paths: () => null,
          points: { show: false },
          value: () => (baseline ? `${fmt(baseline.median)} ± ${fmt(baseline.spread)}` : "not yet set"),
        },
      ],
      legend: { live: true },
      cursor: {
        sync: { key: syncKey },
        drag: isHr ? { x: true, y: false, setScale: false } : { x: false, y: false, setScale: false },
      },
      hooks: {
        drawClear: [(u) => drawBaselineBand(u, baseline, c)],
        draw: [
          (u) => {
            drawUnusable(u, spans, c);
            drawFlags(u, flags, untilS, c, true);
            drawAnnotations(u, dto.annotations, c, true);
            // The whole night needs no outline; a narrower zoom range is shown where it lies.
            const r = rangeRef.current;
            if (isHr && r && r.toS - r.fromS < toS - fromS - 1) drawRange(u, r, c);
          },
        ],
        setCursor: [
          (u) => {
            const left = u.cursor.left;
            if (left != null && left >= 0) cursorRef.current = u.posToVal(left, "x");
          },
        ],
        setSelect: [
          (u) => {
            if (!isHr || u.select.width < 4) return;
            const a = u.posToVal(u.select.left, "x");
            const b = u.posToVal(u.select.left + u.select.width, "x");
            u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
            zoomRef.current?.onSelect(a, b);
          },
        ],
      },
    };
  }, [dto, index, cols, meta, syncKey, isHr, cursorRef]);

  // The zoom outline moves without rebuilding the chart.
  useEffect(() => {
    chart.current?.redraw(false, false);
  }, [zoom?.range]);

  const onCreate = (u: uPlot) => {
    chart.current = u;
    onDrawn();
    let down: [number, number] | null = null;
    u.over.addEventListener("mousedown", (e) => {
      down = [e.clientX, e.clientY];
    });
    u.over.addEventListener("click", (e) => {
      // A drag (a brushed range) is not a click.
      if (down && Math.hypot(e.clientX - down[0], e.clientY - down[1]) > 4) return;
      const left = u.cursor.left;
      if (left == null || left < 0) return;
      const d = dtoRef.current;
      const i = nearestIndex(d.short.t, u.posToVal(left, "x"));
      if (i >= 0) router.push(windowHref(d.stayId, d.short.start[i]!));
    });
    if (zoomRef.current) {
      u.over.addEventListener(
        "wheel",
        (e) => {
          e.preventDefault();
          const rect = u.over.getBoundingClientRect();
          zoomRef.current?.onWheel(e.deltaY < 0 ? -1 : 1, u.posToVal(e.clientX - rect.left, "x"));
        },
        { passive: false },
      );
    }
  };

  const headingId = `chart-${index}`;
  return (
    <section aria-labelledby={headingId} className="border-t border-line pt-3 first:border-t-0 first:pt-0">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4">
        <h3 id={headingId} className="font-bold">
          {meta.label}
          {meta.unit && <span className="font-normal text-muted"> ({meta.unit})</span>}
        </h3>
        <p className="text-xs text-muted">{meta.method}</p>
      </div>
      <UPlotChart options={options} data={data} onCreate={onCreate} />
      <IndexTable dto={dto} index={index} />
    </section>
  );
}

interface HourRow {
  fromS: number;
  toS: number;
  median: number | null;
  usable: number;
  total: number;
  firstUsableStartS: number | null;
}

/** Hourly medians of an index, by window start, in UTC hours from the night's start (labelled in local time). */
function hourlyRows(dto: NightDTO, index: NightKey): HourRow[] {
  const cols = columnsOf(dto, index);
  const values = cols.values[index]!;
  const fromS = Date.parse(dto.night.from) / 1000;
  const toS = Date.parse(dto.night.to) / 1000;
  const rows: HourRow[] = [];
  for (let h = fromS; h < toS; h += HOUR_S) {
    const vals: number[] = [];
    let total = 0;
    let first: number | null = null;
    cols.start.forEach((s, i) => {
      if (s < h || s >= h + HOUR_S) return;
      total++;
      const v = values[i];
      if (v != null) {
        vals.push(v);
        first ??= s;
      }
    });
    rows.push({ fromS: h, toS: Math.min(h + HOUR_S, toS), median: vals.length ? median(vals) : null, usable: vals.length, total, firstUsableStartS: first });
  }
  return rows;
}

function IndexTable({ dto, index }: { dto: NightDTO; index: NightKey }) {
  const meta = INDEX_META[index];
  const rows = useMemo(() => hourlyRows(dto, index), [dto, index]);
  const baseline = dto.baselines[index];
  const flags = dto.flags.filter((f) => f.index === index);
  const tz = dto.timeZone;
  return (
    <details className="mt-1 text-sm">
      <summary className="cursor-pointer text-accent">Table: {meta.label} by hour</summary>
      <p className="mt-2 text-muted">
        {baseline
          ? `Own baseline: median ${formatValue(baseline.median, meta.digits)}${baseline.spread !== null ? `, spread ${formatValue(baseline.spread, meta.digits)}` : ""}, from ${baseline.nWindows} windows.`
          : "No own baseline for this index yet."}{" "}
        {flags.length ? `Flags on this index: ${flags.map((f) => `${f.severity} (${clock(f.conditionFrom, tz)})`).join(", ")}.` : "No flags on this index this night."}
      </p>
      <table className="mt-2">
        <caption className="sr-only">Hourly median of {meta.label} through the night, with the windows that had a usable value</caption>
        <thead>
          <tr>
            <th scope="col">Hour</th>
            <th scope="col">Median{meta.unit ? ` (${meta.unit})` : ""}</th>
            <th scope="col">Windows with a value</th>
            <th scope="col">Window detail</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.fromS}>
              <th scope="row" className="font-normal text-ink">{clock(r.fromS, tz)} – {clock(r.toS, tz)}</th>
              <td className="font-mono">{formatValue(r.median, meta.digits)}</td>
              <td>{r.usable} of {r.total}</td>
              <td>
                {r.firstUsableStartS !== null ? (
                  <Link href={windowHref(dto.stayId, r.firstUsableStartS)}>
                    {meta.kind === "short" ? "First usable window" : "5-min window at its start"}
                    <span className="sr-only"> of the hour from {clock(r.fromS, tz)} ({meta.label})</span>
                  </Link>
                ) : (
                  <span className="text-muted">no usable window</span>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}

export function TrendCharts({ dto, range, onSelect, onWheel, cursorRef }: {
  dto: NightDTO;
  range: ZoomRange;
  onSelect: (fromS: number, toS: number) => void;
  onWheel: (direction: 1 | -1, centreS: number) => void;
  cursorRef: RefObject<number | null>;
}) {
  const syncKey = `night-${dto.stayId}`;
  // A performance mark once every chart of the page has drawn the first time (npm run bench:ui reads it).
  const drawn = useRef(new Set<string>());
  const onDrawn = (k: string) => {
    if (drawn.current.has(k)) return;
    drawn.current.add(k);
    if (drawn.current.size === CHART_KEYS.length) requestAnimationFrame(() => performance.mark("corvane:night-charts-drawn"));
  };
  return (
    <div className="space-y-3">
      {CHART_KEYS.map((k) => (
        <TrendChart
          key={k}
          dto={dto}
          index={k}
          syncKey={syncKey}
          cursorRef={cursorRef}
          onDrawn={() => onDrawn(k)}
          {...(k === "hr" && { zoom: { range, onSelect, onWheel } })}
        />
      ))}
    </div>
  );
}
