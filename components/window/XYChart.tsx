"use client";
// One configurable chart for every Window detail and Research panel plot, on the one uPlot island
// (components/charts/UPlotChart.tsx). Each series brings its own x values; points are drawn as shapes and lines as
// solid or dashed strokes, so no series is told apart by colour alone. The canvas is hidden from assistive technology:
// every caller renders a table or text alternative beside it, and a legend in words (LegendItem).
import { useMemo } from "react";
import uPlot from "uplot";
import { axisStyle, chartColours, UPlotChart } from "@/components/charts/UPlotChart";
import { timeAxis } from "@/components/night/chart-draw";
import { alignSeries, lineSeries, pointSeries, shapePoints, type Shape } from "./chart-kit";

export type Colour = keyof ReturnType<typeof chartColours>;

export interface XYSeries {
  label: string;
  kind: "points" | "line" | "dashed" | "line+points";
  colour: Colour;
  shape?: Shape;
  /** Points drawn hollow (panel-coloured fill). */
  hollow?: boolean;
  x: ArrayLike<number>;
  y: ArrayLike<number | null>;
}

/** A shaded, labelled x range (spectral bands); `outline` draws a dashed frame instead of a fill. */
export interface XBand {
  label: string;
  from: number;
  to: number;
  colour: Colour;
  outline?: boolean;
}

export interface XYChartProps {
  series: XYSeries[];
  xLabel: string;
  yLabel: string;
  height?: number;
  /** x values are epoch seconds, shown in this IANA zone. */
  timeZone?: string;
  logX?: boolean;
  logY?: boolean;
  /** Same range on both axes (a Poincaré plot), so the line of identity runs at 45°. */
  squareRange?: boolean;
  bands?: XBand[];
}

const BAND_ALPHA = 0.16;

function drawBands(bands: XBand[], c: ReturnType<typeof chartColours>) {
  const span = (u: uPlot, b: XBand) => {
    const left = u.bbox.left;
    const right = u.bbox.left + u.bbox.width;
    const x0 = Math.max(left, Math.min(right, u.valToPos(b.from, "x", true)));
    const x1 = Math.max(left, Math.min(right, u.valToPos(b.to, "x", true)));
    return [x0, x1] as const;
  };
  return {
    drawClear: [
      (u: uPlot) => {
        const ctx = u.ctx;
        for (const b of bands) {
          const [x0, x1] = span(u, b);
          if (x1 <= x0) continue;
          ctx.save();
          if (b.outline) {
            ctx.strokeStyle = c[b.colour];
            ctx.lineWidth = 1.5 * uPlot.pxRatio;
            ctx.setLineDash([6 * uPlot.pxRatio, 4 * uPlot.pxRatio]);
            ctx.strokeRect(x0, u.bbox.top + 1, x1 - x0, u.bbox.height - 2);
          } else {
            ctx.globalAlpha = BAND_ALPHA;
            ctx.fillStyle = c[b.colour];
            ctx.fillRect(x0, u.bbox.top, x1 - x0, u.bbox.height);
          }
          ctx.restore();
        }
      },
    ],
    draw: [
      (u: uPlot) => {
        const ctx = u.ctx;
        ctx.save();
        ctx.fillStyle = c.ink;
        ctx.font = `bold ${12 * uPlot.pxRatio}px "Atkinson Hyperlegible", system-ui, sans-serif`;
        ctx.textBaseline = "top";
        bands.forEach((b, i) => {
          const [x0, x1] = span(u, b);
          if (x1 <= x0) return;
          // Outlined (reference) bands are labelled at the bottom, so two labels never overlap.
          const y = b.outline ? u.bbox.top + u.bbox.height - 18 * uPlot.pxRatio : u.bbox.top + (4 + 14 * (i % 2)) * uPlot.pxRatio;
          ctx.fillText(b.label, x0 + 4 * uPlot.pxRatio, y);
        });
        ctx.restore();
      },
    ],
  };
}

export function XYChart({ series, xLabel, yLabel, height = 260, timeZone, logX, logY, squareRange, bands }: XYChartProps) {
  const data = useMemo(() => alignSeries(series), [series]);
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    let range: uPlot.Range.MinMax | undefined;
    if (squareRange) {
      let lo = Infinity;
      let hi = -Infinity;
      for (const s of series) {
        for (const a of [s.x, s.y]) {
          for (let i = 0; i < a.length; i++) {
            const v = a[i];
            if (v == null) continue;
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
          }
        }
      }
      const pad = (hi - lo) * 0.04 || 1;
      range = [lo - pad, hi + pad];
    }
    return {
      height,
      legend: { show: false },
      cursor: { points: { show: false } },
      ...(timeZone && { tzDate: (ts: number) => uPlot.tzDate(new Date(ts * 1e3), timeZone) }),
      scales: {
        x: { time: Boolean(timeZone), ...(logX && { distr: 3 }), ...(range && { range }) },
        y: { ...(logY && { distr: 3 }), ...(range && { range }) },
      },
      axes: [
        timeZone ? { ...timeAxis(c, timeZone, false, true), label: xLabel, size: 50 } : { ...axisStyle(c), label: xLabel },
        { ...axisStyle(c), label: yLabel, size: 64 },
      ],
      series: [
        {},
        ...series.map((s): uPlot.Series => {
          const stroke = c[s.colour];
          const fill = s.hollow ? c.panel : stroke;
          const shape = s.shape ?? "circle";
          switch (s.kind) {
            case "points":
              return pointSeries(s.label, shape, stroke, fill);
            case "line":
              return lineSeries(s.label, stroke);
            case "dashed":
              return lineSeries(s.label, stroke, 2, [6, 4]);
            case "line+points":
              return { ...lineSeries(s.label, stroke), points: { show: true, size: 8, width: 1.5, stroke, fill, paths: shapePoints(shape, 8) } };
          }
        }),
      ],
      ...(bands && { hooks: drawBands(bands, c) }),
    };
  }, [series, xLabel, yLabel, height, timeZone, logX, logY, squareRange, bands]);
  return <UPlotChart options={options} data={data} />;
}
