"use client";
// Poincaré plot of the window: each NN interval against the next, with the SD1/SD2 ellipse and its two 45° axes
// (Brennan, Palaniswami & Kamen 2001).
import { useMemo } from "react";
import type { PoincareDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type XYSeries } from "./XYChart";

export function PoincareChart({ data }: { data: PoincareDTO }) {
  const series = useMemo((): XYSeries[] => {
    const lo = Math.min(...data.x, ...data.y);
    const hi = Math.max(...data.x, ...data.y);
    const pick = (edited: number) => data.y.map((v, i) => (data.edited[i] === edited ? v : null));
    const { sd1, sd2 } = data.axes;
    return [
      { label: "Line of identity", kind: "dashed", colour: "quiet", x: [lo, hi], y: [lo, hi] },
      { label: "Pair of NN intervals", kind: "points", colour: "muted", shape: "circle", x: data.x, y: pick(0) },
      { label: "Pair with an edited interval", kind: "points", colour: "fine", shape: "square", hollow: true, x: data.x, y: pick(1) },
      { label: "Ellipse, upper arc", kind: "line", colour: "accent", x: data.ellipse.x, y: data.ellipse.upper },
      { label: "Ellipse, lower arc", kind: "line", colour: "accent", x: data.ellipse.x, y: data.ellipse.lower },
      { label: "SD2 axis", kind: "line", colour: "caution", x: [sd2[0][0], sd2[1][0]], y: [sd2[0][1], sd2[1][1]] },
      { label: "SD1 axis", kind: "dashed", colour: "caution", x: [sd1[1][0], sd1[0][0]], y: [sd1[1][1], sd1[0][1]] },
    ];
  }, [data]);
  const editedPairs = data.edited.filter((e) => e === 1).length;
  return (
    <ChartFigure
      id="poincare"
      title="Poincaré plot"
      summary={
        <>
          {data.x.length} pairs (NN<sub>n</sub>, NN<sub>n+1</sub>){editedPairs ? `, ${editedPairs} with an edited interval` : ""}. Ellipse centred at (
          {fmt(data.centre[0], 0)}, {fmt(data.centre[1], 0)}) ms with SD1 = {fmt(data.sd1, 1)} ms across and SD2 = {fmt(data.sd2, 1)} ms along
          the line of identity; SD1/SD2 = {fmt(data.sd1Sd2, 2)}.
        </>
      }
      legend={
        <>
          <LegendItem shape="circle" className="text-muted">Pair of NN intervals (circle)</LegendItem>
          <LegendItem shape="square" className="text-fine">Pair with an edited interval (square)</LegendItem>
          <LegendItem shape="line" className="text-accent">SD1/SD2 ellipse (line)</LegendItem>
          <LegendItem shape="line" className="text-caution">SD2 axis, along the line of identity (solid)</LegendItem>
          <LegendItem shape="dashed" className="text-caution">SD1 axis, across it (dashed)</LegendItem>
          <LegendItem shape="dashed" className="text-quiet">Line of identity (dashed)</LegendItem>
        </>
      }
      tableLabel="Table of the ellipse and every pair"
      table={
        <>
          <table>
            <caption className="sr-only">Poincaré ellipse</caption>
            <tbody>
              <tr><th scope="row">SD1 (ms)</th><td>{fmt(data.sd1, 2)}</td></tr>
              <tr><th scope="row">SD2 (ms)</th><td>{fmt(data.sd2, 2)}</td></tr>
              <tr><th scope="row">SD1/SD2</th><td>{fmt(data.sd1Sd2, 3)}</td></tr>
              <tr><th scope="row">Centre (ms)</th><td>{fmt(data.centre[0], 1)}, {fmt(data.centre[1], 1)}</td></tr>
            </tbody>
          </table>
          <table className="mt-3">
            <caption className="sr-only">Every pair of successive NN intervals</caption>
            <thead>
              <tr><th scope="col">#</th><th scope="col">NN<sub>n</sub> (ms)</th><th scope="col">NN<sub>n+1</sub> (ms)</th><th scope="col">Edited</th></tr>
            </thead>
            <tbody>
              {data.x.map((x, i) => (
                <tr key={i}>
                  <td>{i + 1}</td>
                  <td>{fmt(x, 1)}</td>
                  <td>{fmt(data.y[i], 1)}</td>
                  <td>{data.edited[i] ? "yes" : "no"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      }
    >
      <div className="mx-auto max-w-md">
        <XYChart series={series} xLabel="NN n (ms)" yLabel="NN n+1 (ms)" squareRange height={380} />
      </div>
    </ChartFigure>
  );
}
