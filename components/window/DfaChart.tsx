"use client";
// DFA log-log plot: log10 F(n) against log10 n with both fitted lines — α1 over 4–16 beats on this window and α2 over
// 16–64 beats on the hour around it (Peng et al. 1995).
import { useMemo } from "react";
import type { DfaDTO, DfaFitDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type XYSeries } from "./XYChart";

const range = (f: DfaFitDTO) => `n = ${f.scales[0]}–${f.scales[f.scales.length - 1]}`;

function FitRows({ name, fit }: { name: string; fit: DfaFitDTO }) {
  return fit.scales.map((n, i) => (
    <tr key={`${name}-${n}`}>
      <td>{name}</td>
      <td>{n}</td>
      <td>{fmt(fit.log10n[i], 3)}</td>
      <td>{fmt(fit.log10F[i], 3)}</td>
      <td>{fmt(fit.fitLog10F[i], 3)}</td>
    </tr>
  ));
}

export function DfaChart({ data }: { data: DfaDTO }) {
  const { alpha1, alpha2 } = data;
  const series = useMemo((): XYSeries[] => {
    const out: XYSeries[] = [];
    if (alpha1) {
      out.push({ label: "F(n), this window", kind: "points", colour: "accent", shape: "circle", x: alpha1.log10n, y: alpha1.log10F });
      out.push({ label: "α1 fit", kind: "line", colour: "accent", x: alpha1.log10n, y: alpha1.fitLog10F });
    }
    if (alpha2) {
      out.push({ label: "F(n), the hour", kind: "points", colour: "caution", shape: "diamond", x: alpha2.log10n, y: alpha2.log10F });
      out.push({ label: "α2 fit", kind: "dashed", colour: "caution", x: alpha2.log10n, y: alpha2.fitLog10F });
    }
    return out;
  }, [alpha1, alpha2]);
  return (
    <ChartFigure
      id="dfa"
      title="Detrended fluctuation analysis"
      summary={
        <>
          {alpha1 ? <>α1 = {fmt(alpha1.alpha, 2)} over {range(alpha1)} on this window ({alpha1.beats} beats, r² = {fmt(alpha1.r2, 3)}). </> : <>α1 not shown: {data.alpha1Reason}. </>}
          {alpha2 ? <>α2 = {fmt(alpha2.alpha, 2)} over {range(alpha2)} on the hour around it ({alpha2.beats} beats, r² = {fmt(alpha2.r2, 3)}); a 5-min window is too short for α2.</> : <>α2 not shown: {data.alpha2Reason}.</>}
        </>
      }
      legend={
        <>
          {alpha1 && <LegendItem shape="circle" className="text-accent">F(n) of this window (circle); α1 = {fmt(alpha1.alpha, 2)}, fitted line (solid)</LegendItem>}
          {alpha2 && <LegendItem shape="diamond" className="text-caution">F(n) of the hour (diamond); α2 = {fmt(alpha2.alpha, 2)}, fitted line (dashed)</LegendItem>}
        </>
      }
      tableLabel="Table of F(n) and both fits"
      table={
        <table>
          <caption className="sr-only">DFA fluctuation F(n) per box size, with the fitted lines</caption>
          <thead>
            <tr><th scope="col">Fit</th><th scope="col">n (beats)</th><th scope="col">log10 n</th><th scope="col">log10 F(n)</th><th scope="col">Fitted log10 F</th></tr>
          </thead>
          <tbody>
            {alpha1 && <FitRows name="α1, this window" fit={alpha1} />}
            {alpha2 && <FitRows name="α2, the hour" fit={alpha2} />}
          </tbody>
        </table>
      }
    >
      <XYChart series={series} xLabel="log10 n (beats)" yLabel="log10 F(n) (ms)" />
    </ChartFigure>
  );
}
