"use client";
// Lomb–Scargle power spectrum of the window on its own beat times (abnormal beats deleted, no resampling), with the
// VLF, LF and HF bands shaded and labelled (Task Force 1996), and for a neonatal unit the neonatal HF range outlined
// for orientation.
import { useMemo } from "react";
import type { SpectrumDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type Colour, type XBand, type XYSeries } from "./XYChart";

const BAND_COLOURS: Colour[] = ["quiet", "caution", "fine"];

export function SpectrumChart({ data }: { data: SpectrumDTO }) {
  const series = useMemo((): XYSeries[] => [{ label: "PSD", kind: "line", colour: "accent", x: data.f, y: data.psd }], [data]);
  const bands = useMemo(
    (): XBand[] =>
      data.bands.map((b, i) => ({
        label: b.reference ? `${b.label} (reference)` : b.label,
        from: b.loHz,
        to: b.hiHz,
        colour: b.reference ? "muted" : BAND_COLOURS[i % BAND_COLOURS.length]!,
        outline: b.reference,
      })),
    [data],
  );
  return (
    <ChartFigure
      id="spectrum"
      title="Power spectrum"
      summary={
        <>
          Lomb–Scargle spectrum of the window up to its mean Nyquist frequency, {fmt(data.nyquistHz, 3)} Hz.{" "}
          {data.bands
            .filter((b) => !b.reference)
            .map((b) => `${b.label} ${fmt(b.powerMs2, 0)} ms²`)
            .join(", ")}
          . LF peak {fmt(data.lfPeakHz, 3)} Hz, HF peak {fmt(data.hfPeakHz, 3)} Hz.
        </>
      }
      legend={
        <>
          <LegendItem shape="line" className="text-accent">Power spectral density (line)</LegendItem>
          {data.bands.map((b, i) => (
            <LegendItem key={b.key} shape={b.reference ? "dashed" : "band"} className={b.reference ? "text-muted" : ["text-quiet", "text-caution", "text-fine"][i % 3]}>
              {b.label} {b.loHz}–{b.hiHz} Hz ({b.reference ? "outlined, reference only" : "shaded band"})
            </LegendItem>
          ))}
        </>
      }
      tableLabel="Table of band powers and the spectrum"
      table={
        <>
          <table>
            <caption className="sr-only">Band powers</caption>
            <thead>
              <tr><th scope="col">Band</th><th scope="col">Range (Hz)</th><th scope="col">Power (ms²)</th><th scope="col">Note</th></tr>
            </thead>
            <tbody>
              {data.bands.map((b) => (
                <tr key={b.key}>
                  <th scope="row">{b.label}</th>
                  <td>{b.loHz}–{b.hiHz}</td>
                  <td>{fmt(b.powerMs2, 1)}</td>
                  <td>{b.reason ?? b.note ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <table className="mt-3">
            <caption className="sr-only">Power spectral density at each frequency</caption>
            <thead>
              <tr><th scope="col">Frequency (Hz)</th><th scope="col">PSD (ms²/Hz)</th></tr>
            </thead>
            <tbody>
              {data.f.map((f, i) => (
                <tr key={f}><td>{fmt(f, 3)}</td><td>{fmt(data.psd[i], 1)}</td></tr>
              ))}
            </tbody>
          </table>
        </>
      }
    >
      <XYChart series={series} xLabel="Frequency (Hz)" yLabel="PSD (ms²/Hz)" bands={bands} />
    </ChartFigure>
  );
}
