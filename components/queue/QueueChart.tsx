"use client";
// A small chart of a flag's span: the rule's index over the condition ± 30 min, with the condition shaded (hatched
// edges and a labelled band, not colour alone), the patient's own baseline median (dashed) and the rule's threshold
// (dotted). Unusable windows are gaps. A sentence below says the same in words (the canvas is hidden from assistive
// technology by the uPlot island).
import { useMemo } from "react";
import uPlot from "uplot";
import { UPlotChart, axisStyle, chartColours } from "@/components/charts/UPlotChart";
import { timeAxis } from "@/components/night/chart-draw";
import type { QueueChartDTO } from "@/lib/queue/repository";
import { chartMeta, clock, withUnit } from "./format";

const HEIGHT_PX = 120;

export function describeChart(chart: QueueChartDTO, timeZone: string): string {
  const m = chartMeta(chart.key);
  const fmt = (v: number) => withUnit((v * m.scale).toFixed(m.digits), m.unit);
  const values = chart.v.filter((v): v is number => v !== null);
  const span = `${clock(chart.from, timeZone)} to ${clock(chart.to, timeZone)}`;
  const condition = `condition from ${clock(chart.conditionFrom, timeZone)}${chart.conditionTo === null ? ", still holding" : ` to ${clock(chart.conditionTo, timeZone)}`}`;
  const parts = [
    values.length ? `${m.short} ${fmt(Math.min(...values))} to ${fmt(Math.max(...values))} from ${span}` : `No usable ${m.short} value from ${span}`,
    condition,
  ];
  if (chart.baseline) parts.push(`own baseline median ${fmt(chart.baseline.median)}${chart.baseline.spread !== null ? ` (spread ${fmt(chart.baseline.spread)})` : ""}`);
  else if (chart.key !== "coverage") parts.push("no baseline yet");
  if (chart.threshold !== null) parts.push(`threshold ${fmt(chart.threshold)}`);
  const gaps = chart.v.length - values.length;
  if (gaps) parts.push(`${gaps} of ${chart.v.length} windows without a usable value`);
  if (chart.truncated) parts.push("first 3 h of the condition shown");
  return `${parts.join("; ")}.`;
}

export function QueueChart({ chart, timeZone }: { chart: QueueChartDTO; timeZone: string }) {
  const m = chartMeta(chart.key);
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    const constant = (v: number | null | undefined) => (v == null ? null : v * m.scale);
    return {
      height: HEIGHT_PX,
      padding: [6, 6, 0, 0],
      legend: { show: false },
      cursor: { show: false },
      scales: {
        x: { time: true, range: () => [chart.from, chart.to] },
        // Keep the baseline and threshold in view even when every value lies on one side of them.
        y: {
          range: (_u, min, max) => {
            const marks = [min, max, constant(chart.baseline?.median), constant(chart.threshold)].filter((v): v is number => v != null && Number.isFinite(v));
            const lo = Math.min(...marks);
            const hi = Math.max(...marks);
            const pad = hi > lo ? (hi - lo) * 0.08 : Math.abs(hi) * 0.1 || 1;
            return [lo - pad, hi + pad];
          },
        },
      },
      axes: [
        { ...timeAxis(c, timeZone, false), size: 28, font: '11px "Atkinson Hyperlegible", system-ui, sans-serif' },
        { ...axisStyle(c), size: 44, font: '11px "Atkinson Hyperlegible", system-ui, sans-serif' },
      ],
      series: [
        {},
        { stroke: c.accent, width: 2, points: { show: false }, spanGaps: false },
        { stroke: c.fine, width: 1.5, dash: [6, 4], points: { show: false } },
        { stroke: c.muted, width: 1, dash: [2, 3], points: { show: false } },
      ],
      hooks: {
        // The condition's span: a light band with solid edges, drawn under the lines.
        drawClear: [
          (u) => {
            const x0 = u.valToPos(chart.conditionFrom, "x", true);
            const x1 = u.valToPos(chart.conditionTo ?? chart.to, "x", true);
            const { top, height } = u.bbox;
            const ctx = u.ctx;
            ctx.save();
            ctx.globalAlpha = 0.18;
            ctx.fillStyle = c.caution;
            ctx.fillRect(x0, top, Math.max(1, x1 - x0), height);
            ctx.globalAlpha = 1;
            ctx.strokeStyle = c.caution;
            ctx.lineWidth = 1;
            ctx.beginPath();
            ctx.moveTo(x0, top);
            ctx.lineTo(x0, top + height);
            if (chart.conditionTo !== null) {
              ctx.moveTo(x1, top);
              ctx.lineTo(x1, top + height);
            }
            ctx.stroke();
            ctx.restore();
          },
        ],
      },
      tzDate: (ts) => uPlot.tzDate(new Date(ts * 1e3), timeZone),
    };
  }, [chart, timeZone, m.scale]);
  const data = useMemo((): uPlot.AlignedData => {
    const base = chart.baseline ? chart.baseline.median * m.scale : null;
    const thr = chart.threshold !== null ? chart.threshold * m.scale : null;
    return [chart.t, chart.v.map((v) => (v === null ? null : v * m.scale)), chart.t.map(() => base), chart.t.map(() => thr)];
  }, [chart, m.scale]);
  return (
    <figure className="min-w-0">
      {chart.t.length ? <UPlotChart options={options} data={data} minWidth={220} /> : null}
      <figcaption className="mt-1 text-sm text-muted">
        <span aria-hidden="true">
          <span className="text-accent">━</span> {m.short} · <span className="text-fine">╍</span> own baseline ·{" "}
          <span>┈</span> threshold · shaded: condition.{" "}
        </span>
        {describeChart(chart, timeZone)}
      </figcaption>
    </figure>
  );
}
