"use client";
// One daily chart of the Quality metrics (a line per series, one point per local day), with its table as the text
// alternative (the canvas is hidden from assistive technology by the uPlot island). Series differ by line style and
// are named in a legend with the same line drawn in text, never by colour alone.
import { useMemo } from "react";
import type uPlot from "uplot";
import { UPlotChart, axisStyle, chartColours } from "@/components/charts/UPlotChart";
import { fmtDay, fmtMinutes, fmtPercent, fmtRate } from "./format";

const HEIGHT_PX = 180;

export type ChartKind = "minutes" | "percent" | "rate";

export interface DailySeries {
  label: string;
  /** In the chart's unit: minutes, a share 0..1 (shown as %), or a rate. null = no value that day (a gap). */
  values: (number | null)[];
  dashed?: boolean;
}

const FORMAT: Record<ChartKind, (v: number | null) => string> = { minutes: fmtMinutes, percent: fmtPercent, rate: fmtRate };
const AXIS_LABEL: Record<ChartKind, string> = { minutes: "minutes", percent: "%", rate: "per 100 patient-hours" };

export function DailyChart({ title, dates, series, kind, extra = [] }: {
  title: string;
  dates: string[];
  series: DailySeries[];
  kind: ChartKind;
  /** Columns for the table only (e.g. how many flags each day's median rests on). */
  extra?: { label: string; values: string[] }[];
}) {
  const scale = kind === "percent" ? 100 : 1;
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    const strokes = [c.accent, c.fine, c.caution, c.ink];
    return {
      height: HEIGHT_PX,
      padding: [8, 12, 0, 0],
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: {
        x: { time: false, range: () => [-0.5, Math.max(0.5, dates.length - 0.5)] },
        y: { range: (_u, _min, max) => [0, kind === "percent" ? 100 : Math.max(1, (max ?? 0) * 1.1)] },
      },
      axes: [
        { ...axisStyle(c), size: 34, space: 70, incrs: [1, 2, 7, 14, 28, 56, 91], values: (_u, splits) => splits.map((s) => (Number.isInteger(s) && dates[s] ? fmtDay(dates[s]!) : "")) },
        { ...axisStyle(c), size: 52, label: AXIS_LABEL[kind] },
      ],
      series: [
        {},
        ...series.map((s, i) => ({
          label: s.label,
          stroke: strokes[i % strokes.length],
          width: 2,
          dash: s.dashed ? [7, 5] : undefined,
          points: { show: true, size: 6, fill: c.panel },
          spanGaps: false,
        })),
      ],
    };
  }, [dates, series, kind]);
  const data = useMemo(
    (): uPlot.AlignedData => [dates.map((_, i) => i), ...series.map((s) => s.values.map((v) => (v === null ? null : v * scale)))],
    [dates, series, scale],
  );
  const fmt = FORMAT[kind];
  return (
    <figure className="min-w-0">
      <figcaption className="mb-1 text-sm font-bold">{title}</figcaption>
      <p className="mb-1 text-sm text-muted" aria-hidden="true">
        {series.map((s) => (
          <span key={s.label} className="mr-4 whitespace-nowrap">
            <span className="font-mono">{s.dashed ? "╌╌" : "━━"}</span> {s.label}
          </span>
        ))}
      </p>
      {dates.length ? <UPlotChart options={options} data={data} minWidth={260} /> : null}
      <details className="mt-2 text-sm">
        <summary className="cursor-pointer text-accent">Daily figures as a table</summary>
        <div className="mt-2 overflow-x-auto">
          <table>
            <caption className="sr-only">{title}, by day</caption>
            <thead>
              <tr>
                <th scope="col">Day</th>
                {series.map((s) => <th key={s.label} scope="col">{s.label}</th>)}
                {extra.map((e) => <th key={e.label} scope="col">{e.label}</th>)}
              </tr>
            </thead>
            <tbody>
              {dates.map((d, i) => (
                <tr key={d}>
                  <th scope="row" className="font-normal text-ink"><time dateTime={d}>{fmtDay(d)}</time></th>
                  {series.map((s) => <td key={s.label}>{fmt(s.values[i] ?? null)}</td>)}
                  {extra.map((e) => <td key={e.label}>{e.values[i]}</td>)}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </details>
    </figure>
  );
}
