"use client";
// The window's tachogram: every RR interval as received, marked by what cleaning concluded (shape and word), and the
// NN series the indices were computed on as a line.
import { formatInTimeZone } from "date-fns-tz";
import { useMemo } from "react";
import type { TachogramDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type XYSeries } from "./XYChart";

type Kind = "normal" | "ectopic" | "corrected" | "removed";

/** Ectopic first (whatever was done with it), then removed, then otherwise corrected, else normal. */
const kindOf = (label: string, action: string): Kind =>
  label === "ectopic" ? "ectopic" : action === "removed" ? "removed" : action !== "kept" ? "corrected" : "normal";

const WORDS: Record<Kind, string> = {
  normal: "Normal beat (circle)",
  ectopic: "Ectopic beat (triangle)",
  corrected: "Other corrected beat (square)",
  removed: "Removed beat (cross)",
};

export function TachogramChart({ data, timeZone }: { data: TachogramDTO; timeZone: string }) {
  const kinds = useMemo(() => data.t.map((_, i) => kindOf(data.label[i]!, data.action[i]!)), [data]);
  const counts = useMemo(() => {
    const c: Record<Kind, number> = { normal: 0, ectopic: 0, corrected: 0, removed: 0 };
    for (const k of kinds) c[k]++;
    return c;
  }, [kinds]);
  const series = useMemo((): XYSeries[] => {
    const only = (k: Kind) => data.rr.map((v, i) => (kinds[i] === k ? v : null));
    return [
      { label: "NN series", kind: "line", colour: "accent", x: data.nnT, y: data.nn },
      { label: "Normal beat", kind: "points", colour: "muted", shape: "circle", x: data.t, y: only("normal") },
      { label: "Ectopic beat", kind: "points", colour: "caution", shape: "triangle", x: data.t, y: only("ectopic") },
      { label: "Other corrected beat", kind: "points", colour: "fine", shape: "square", hollow: true, x: data.t, y: only("corrected") },
      { label: "Removed beat", kind: "points", colour: "problem", shape: "cross", x: data.t, y: only("removed") },
    ];
  }, [data, kinds]);
  const rrMin = Math.min(...data.rr);
  const rrMax = Math.max(...data.rr);
  return (
    <ChartFigure
      id="tachogram"
      title="Tachogram"
      summary={
        <>
          {data.t.length} intervals received ({fmt(rrMin, 0)}–{fmt(rrMax, 0)} ms): {counts.normal} normal, {counts.ectopic} ectopic,{" "}
          {counts.corrected} otherwise corrected, {counts.removed} removed. The line is the NN series ({data.nn.length} intervals) every index was computed on.
        </>
      }
      legend={
        <>
          <LegendItem shape="line" className="text-accent">NN series used for the indices (line)</LegendItem>
          <LegendItem shape="circle" className="text-muted">{WORDS.normal}</LegendItem>
          <LegendItem shape="triangle" className="text-caution">{WORDS.ectopic}</LegendItem>
          <LegendItem shape="square" className="text-fine">{WORDS.corrected}</LegendItem>
          <LegendItem shape="cross" className="text-problem">{WORDS.removed}</LegendItem>
        </>
      }
      tableLabel="Table of every interval in the window"
      table={
        <table>
          <caption className="sr-only">Every RR interval of the window with what cleaning did with it</caption>
          <thead>
            <tr>
              <th scope="col">Beat time</th>
              <th scope="col">RR (ms)</th>
              <th scope="col">Device beat type</th>
              <th scope="col">Cleaning class</th>
              <th scope="col">Action</th>
            </tr>
          </thead>
          <tbody>
            {data.t.map((t, i) => (
              <tr key={t}>
                <td className="font-mono">{formatInTimeZone(t * 1000, timeZone, "HH:mm:ss.SSS")}</td>
                <td>{fmt(data.rr[i], 0)}</td>
                <td>{data.deviceType[i] ?? "—"}</td>
                <td>{data.label[i]!.replace(/_/g, " ")}</td>
                <td>{data.action[i]}</td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      <XYChart series={series} xLabel="Time" yLabel="RR (ms)" timeZone={timeZone} height={240} />
    </ChartFigure>
  );
}
