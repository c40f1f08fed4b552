"use client";
// A small heart-rate line over the review night: no axes, no cursor, a break wherever a bucket has no usable window.
// The x range is the whole night, so a night in progress fills from the left. The canvas is hidden from assistive
// technology; a sentence with the range, median and gaps stands in for it.
import { useMemo } from "react";
import uPlot from "uplot";
import { UPlotChart, chartColours } from "@/components/charts/UPlotChart";
import { median } from "@/lib/engine/stats";
import type { OverviewSparklineDTO } from "@/lib/review/overview";
import { formatClock } from "./format";

const HEIGHT_PX = 44;

export interface SparklineProps {
  data: OverviewSparklineDTO;
  /** The night's bounds, ISO instants, and the bucket length, s. */
  from: string;
  to: string;
  bucketS: number;
  timeZone: string;
  /** Drawn in the quiet colour when the stream is stale or has no device. */
  dimmed: boolean;
  /** The stay's admission, ISO: a patient admitted after the night has no night to draw. */
  admittedAt: string | null;
}

/** "HR 62–71 bpm over the night, median 66; no usable value in 4 of 90 five-minute periods". */
export function describeSparkline({ data, from, to, bucketS, timeZone, admittedAt }: SparklineProps): string {
  if (admittedAt && Date.parse(admittedAt) >= Date.parse(to)) return "Admitted after this night.";
  const values = data.hr.filter((v): v is number => v !== null);
  const span = data.t.length ? `${formatClock(from, timeZone)} to ${formatClock(new Date((data.t.at(-1)! + bucketS) * 1000).toISOString(), timeZone)}` : "";
  if (!values.length) return data.t.length ? `No usable heart rate over the night so far (${span}).` : "The night has not started.";
  const r = (v: number) => Math.round(v);
  const gaps = data.hr.length - values.length;
  const minutes = bucketS / 60;
  return (
    `HR ${r(Math.min(...values))}–${r(Math.max(...values))} bpm over the night (${span}), median ${r(median(values))}` +
    (gaps ? `; no usable value in ${gaps} of ${data.hr.length} ${minutes}-minute periods.` : ".")
  );
}

export function Sparkline(props: SparklineProps) {
  const { data, from, to, timeZone, dimmed } = props;
  const hasValues = data.hr.some((v) => v !== null);
  const options = useMemo((): Omit<uPlot.Options, "width"> => {
    const c = chartColours();
    const range: [number, number] = [Date.parse(from) / 1000, Date.parse(to) / 1000];
    return {
      height: HEIGHT_PX,
      padding: [4, 2, 4, 2],
      legend: { show: false },
      cursor: { show: false },
      axes: [{ show: false }, { show: false }],
      scales: {
        x: { time: true, range: () => range },
        // A flat line sits mid-height rather than on an edge.
        y: { range: (_u, min, max) => (min === max ? [min - 5, max + 5] : [min - 2, max + 2]) },
      },
      series: [{}, { stroke: dimmed ? c.quiet : c.accent, width: 2, points: { show: false }, spanGaps: false }],
      tzDate: (ts) => uPlot.tzDate(new Date(ts * 1e3), timeZone),
    };
  }, [from, to, timeZone, dimmed]);
  const aligned = useMemo((): uPlot.AlignedData => [data.t, data.hr], [data]);
  return (
    <div>
      {hasValues ? (
        <UPlotChart options={options} data={aligned} minWidth={120} />
      ) : (
        <p aria-hidden="true" className="text-sm text-muted">
          {props.admittedAt && Date.parse(props.admittedAt) >= Date.parse(to) ? "Admitted after this night" : "No usable HR yet"}
        </p>
      )}
      <p className="sr-only">{describeSparkline(props)}</p>
    </div>
  );
}
