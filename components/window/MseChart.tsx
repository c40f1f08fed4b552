"use client";
// Multiscale entropy curve of the hour around the window: SampEn at τ = 1…20 with r fixed at 0.15 × SD of the hour
// (Costa, Goldberger & Peng 2002, 2005). A 5-min window is far too short for it; the note says so on screen.
import { useMemo } from "react";
import type { MseDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type XYSeries } from "./XYChart";

export function MseChart({ data }: { data: MseDTO }) {
  const series = useMemo((): XYSeries[] => [{ label: "SampEn per scale", kind: "line+points", colour: "accent", shape: "circle", x: data.scales, y: data.sampen }], [data]);
  const missing = data.scales.filter((_, i) => data.sampen[i] === null);
  return (
    <ChartFigure
      id="mse"
      title="Multiscale entropy (the hour around this window)"
      summary={
        <>
          {data.note} SampEn(m = {data.m}, r = {fmt(data.rMs, 1)} ms = 0.15 × SD of {fmt(data.sdMs, 1)} ms) on {data.n} beats at τ = 1–{data.scales.length}
          {missing.length ? `; undefined at τ = ${missing.join(", ")} (see the table)` : ""}.
        </>
      }
      legend={<LegendItem shape="circle" className="text-accent">SampEn at each scale τ (circles joined by a line)</LegendItem>}
      tableLabel="Table of SampEn per scale"
      table={
        <table>
          <caption className="sr-only">Sample entropy at each scale of the hour</caption>
          <thead>
            <tr><th scope="col">τ</th><th scope="col">Points</th><th scope="col">SampEn</th>{data.stored && <th scope="col">Stored</th>}<th scope="col">Why undefined</th></tr>
          </thead>
          <tbody>
            {data.scales.map((s, i) => (
              <tr key={s}>
                <td>{s}</td>
                <td>{data.points[i]}</td>
                <td>{fmt(data.sampen[i], 3)}</td>
                {data.stored && <td>{fmt(data.stored[i] ?? null, 3)}</td>}
                <td>{data.reasons[i] ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      <XYChart series={series} xLabel="Scale τ (beats averaged)" yLabel="SampEn" />
    </ChartFigure>
  );
}
