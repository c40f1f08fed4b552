"use client";
// The one uPlot island: creates the chart after mount (uPlot draws on a canvas and needs the DOM), follows the
// container's width, rebuilds when options change and only updates data when data change, and destroys the chart
// on unmount. Every chart using it must also render a text or table alternative (WCAG 1.1.1): the canvas is
// hidden from assistive technology here.
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export interface UPlotChartProps {
  /** Options without width (taken from the container); height in CSS pixels. */
  options: Omit<uPlot.Options, "width">;
  data: uPlot.AlignedData;
  /** Called with the chart once created (for brushes, cursor hooks, sync). */
  onCreate?: (chart: uPlot) => void;
  className?: string;
  /** Narrowest the chart draws, CSS px (sparklines go smaller than the default). */
  minWidth?: number;
}

export function UPlotChart({ options, data, onCreate, className = "", minWidth = 200 }: UPlotChartProps) {
  const host = useRef<HTMLDivElement>(null);
  const chart = useRef<uPlot | null>(null);
  const onCreateRef = useRef(onCreate);
  onCreateRef.current = onCreate;
  const dataRef = useRef(data);
  dataRef.current = data;

  useEffect(() => {
    const el = host.current;
    if (!el) return;
    const width = Math.max(minWidth, Math.floor(el.clientWidth));
    const u = new uPlot({ ...options, width } as uPlot.Options, dataRef.current, el);
    chart.current = u;
    onCreateRef.current?.(u);
    const ro = new ResizeObserver(() => {
      const w = Math.max(minWidth, Math.floor(el.clientWidth));
      if (w !== u.width) u.setSize({ width: w, height: u.height });
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      u.destroy();
      chart.current = null;
    };
  }, [options, minWidth]);

  useEffect(() => {
    if (chart.current && chart.current.data !== data) chart.current.setData(data);
  }, [data]);

  return <div ref={host} aria-hidden="true" className={`uplot-host ${className}`} />;
}

/** Design tokens as concrete colours for the canvas (uPlot cannot read CSS variables itself). */
export function chartColours(): Record<"ink" | "muted" | "line" | "accent" | "caution" | "fine" | "quiet" | "panel" | "raised" | "problem", string> {
  const css = typeof window === "undefined" ? null : getComputedStyle(document.documentElement);
  const v = (name: string, fallback: string) => css?.getPropertyValue(`--color-${name}`).trim() || fallback;
  return {
    ink: v("ink", "#e7eaf0"),
    muted: v("muted", "#a9b2c0"),
    line: v("line", "#323b49"),
    accent: v("accent", "#86c5d8"),
    caution: v("caution", "#cdbbf2"),
    fine: v("fine", "#a9d8b8"),
    quiet: v("quiet", "#7d8796"),
    panel: v("panel", "#1a1f28"),
    raised: v("raised", "#232a35"),
    problem: v("problem", "#f3b7a1"),
  };
}

/** Axis styling shared by every chart: muted ticks and labels, faint grid. */
export function axisStyle(c: ReturnType<typeof chartColours>): Pick<uPlot.Axis, "stroke" | "grid" | "ticks" | "font" | "labelFont"> {
  return {
    stroke: c.muted,
    grid: { stroke: c.line, width: 1 },
    ticks: { stroke: c.line, width: 1 },
    font: '13px "Atkinson Hyperlegible", system-ui, sans-serif',
    labelFont: 'bold 13px "Atkinson Hyperlegible", system-ui, sans-serif',
  };
}
