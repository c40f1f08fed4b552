// Small pieces shared by the Window detail charts: joining series with their own x values into uPlot's aligned
// columns, point shapes drawn on the canvas (so ectopic and edited beats differ by shape, not colour alone), and
// number formatting. Plotting plumbing only: every number plotted comes from the server's DTO (lib/review).
import uPlot from "uplot";

export type Shape = "circle" | "triangle" | "square" | "diamond" | "cross";

/**
 * Aligned data from series that each have their own x values: one row per distinct x (rows shared by equal x of
 * different series; a series with repeated x, such as a Poincaré cloud of integer-ms intervals, gets one row each).
 * Lines drawn across the nulls this leaves need `spanGaps: true`.
 */
export function alignSeries(series: { x: ArrayLike<number>; y: ArrayLike<number | null> }[]): uPlot.AlignedData {
  const entries: { x: number; s: number; y: number | null }[] = [];
  series.forEach((s, si) => {
    for (let i = 0; i < s.x.length; i++) entries.push({ x: s.x[i]!, s: si, y: s.y[i] ?? null });
  });
  entries.sort((a, b) => a.x - b.x || a.s - b.s);
  const xs: number[] = [];
  const cols = series.map(() => [] as (number | null)[]);
  let used = new Set<number>();
  for (const e of entries) {
    if (xs.length === 0 || e.x !== xs[xs.length - 1] || used.has(e.s)) {
      xs.push(e.x);
      for (const c of cols) c.push(null);
      used = new Set();
    }
    cols[e.s]![xs.length - 1] = e.y;
    used.add(e.s);
  }
  return [xs, ...cols];
}

function addShape(p: Path2D, shape: Shape, x: number, y: number, r: number): void {
  switch (shape) {
    case "circle":
      p.moveTo(x + r, y);
      p.arc(x, y, r, 0, 2 * Math.PI);
      break;
    case "triangle":
      p.moveTo(x, y - r * 1.2);
      p.lineTo(x + r * 1.1, y + r * 0.8);
      p.lineTo(x - r * 1.1, y + r * 0.8);
      p.closePath();
      break;
    case "square":
      p.rect(x - r * 0.9, y - r * 0.9, r * 1.8, r * 1.8);
      break;
    case "diamond":
      p.moveTo(x, y - r * 1.2);
      p.lineTo(x + r * 1.2, y);
      p.lineTo(x, y + r * 1.2);
      p.lineTo(x - r * 1.2, y);
      p.closePath();
      break;
    case "cross":
      p.moveTo(x - r, y - r);
      p.lineTo(x + r, y + r);
      p.moveTo(x + r, y - r);
      p.lineTo(x - r, y + r);
      break;
  }
}

/** A points path builder drawing `shape` (diameter `size` CSS px) at every non-null value of the series. */
export function shapePoints(shape: Shape, size: number): uPlot.Series.Points.PathBuilder {
  return (u, seriesIdx, idx0, idx1) => {
    const s = u.series[seriesIdx]!;
    const xs = u.data[0];
    const ys = u.data[seriesIdx]!;
    const r = (size / 2) * uPlot.pxRatio;
    const p = new Path2D();
    for (let i = idx0; i <= idx1; i++) {
      const y = ys[i];
      if (y == null) continue;
      addShape(p, shape, u.valToPos(xs[i]!, "x", true), u.valToPos(y, s.scale ?? "y", true), r);
    }
    return shape === "cross" ? { stroke: p, fill: null } : { stroke: p, fill: p };
  };
}

/** A series drawn only as points of one shape. */
export function pointSeries(label: string, shape: Shape, stroke: string, fill: string, size = 7): uPlot.Series {
  return {
    label,
    stroke,
    paths: () => null,
    points: { show: true, size, width: 1.5, stroke, fill, paths: shapePoints(shape, size) },
  };
}

/** A line series that joins its values across the nulls of other series' rows. */
export function lineSeries(label: string, stroke: string, width = 2, dash?: number[]): uPlot.Series {
  return { label, stroke, width, spanGaps: true, points: { show: false }, ...(dash && { dash }) };
}

export function fmt(v: number | null | undefined, digits = 2): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  return v.toLocaleString("en-US", { minimumFractionDigits: digits, maximumFractionDigits: digits });
}

/** A share 0–1 as a percentage. */
export function pct(v: number | null | undefined, digits = 1): string {
  return v === null || v === undefined ? "—" : `${fmt(100 * v, digits)} %`;
}
