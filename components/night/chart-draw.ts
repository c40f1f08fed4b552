// Canvas drawing shared by the Night review's charts: the own-baseline band, flagged spans (hatched, outlined and
// labelled with the severity word, so a flag never rests on colour alone), stretches without a usable value, clinical
// event markers, and the x axis in the unit's zone. All positions are canvas pixels (uPlot's bbox).
import { formatInTimeZone } from "date-fns-tz";
import uPlot from "uplot";
import type { AnnotationDTO } from "@/lib/review/annotations";
import type { FlagViewDTO } from "@/lib/review/flags-view";
import { axisStyle, type chartColours } from "@/components/charts/UPlotChart";
import { ANNOTATION_KIND_LABELS } from "@/lib/review/annotations.validation";

export type Colours = ReturnType<typeof chartColours>;

const FONT = '"Atkinson Hyperlegible", system-ui, sans-serif';
const px = (n: number) => n * uPlot.pxRatio;
const font = (size: number, bold = false) => `${bold ? "bold " : ""}${Math.round(px(size))}px ${FONT}`;

/**
 * Text on the plot, left-aligned from (x, y), with a halo in the panel colour so it reads over lines and hatching
 * without hiding a band of data behind an opaque box. uPlot leaves its own text alignment on the context, so it is
 * set here every time.
 */
function label(ctx: CanvasRenderingContext2D, text: string, x: number, y: number, c: Colours) {
  ctx.textAlign = "left";
  ctx.textBaseline = "middle";
  ctx.lineJoin = "round";
  ctx.setLineDash([]);
  ctx.lineWidth = px(3);
  ctx.strokeStyle = c.panel;
  ctx.strokeText(text, x, y);
  ctx.fillStyle = c.ink;
  ctx.fillText(text, x, y);
}

/** A token colour with opacity: "#rrggbb"/"#rgb" become rgba(); anything else is returned as given. */
export function withAlpha(colour: string, alpha: number): string {
  const m = /^#([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(colour.trim());
  if (!m) return colour;
  const h = m[1]!.length === 3 ? [...m[1]!].map((d) => d + d).join("") : m[1]!;
  const [r, g, b] = [0, 2, 4].map((i) => parseInt(h.slice(i, i + 2), 16));
  return `rgba(${r}, ${g}, ${b}, ${alpha})`;
}

const patterns = new Map<string, CanvasPattern | null>();
/** Diagonal hatch (watch) or cross-hatch (review), drawn once per colour and kind. */
function hatch(ctx: CanvasRenderingContext2D, colour: string, cross: boolean): CanvasPattern | string {
  const key = `${colour}|${cross}|${uPlot.pxRatio}`;
  if (!patterns.has(key)) {
    const size = Math.round(px(8));
    const tile = document.createElement("canvas");
    tile.width = tile.height = size;
    const t = tile.getContext("2d");
    if (t) {
      t.strokeStyle = colour;
      t.lineWidth = px(1);
      t.beginPath();
      t.moveTo(0, size);
      t.lineTo(size, 0);
      if (cross) {
        t.moveTo(0, 0);
        t.lineTo(size, size);
      }
      t.stroke();
    }
    patterns.set(key, t ? ctx.createPattern(tile, "repeat") : null);
  }
  return patterns.get(key) ?? withAlpha(colour, 0.25);
}

/** x position (canvas px) of an instant (epoch s), clipped to the plot. */
function xClip(u: uPlot, s: number): number {
  const { left, width } = u.bbox;
  return Math.min(left + width, Math.max(left, u.valToPos(s, "x", true)));
}

/** Own-baseline band, median ± spread, with the median dashed. Drawn under the series (hooks.drawClear). */
export function drawBaselineBand(u: uPlot, baseline: { median: number; spread: number | null } | undefined, c: Colours) {
  if (!baseline) return;
  const { ctx } = u;
  const { left, top, width, height } = u.bbox;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  if (baseline.spread !== null && baseline.spread > 0) {
    const y1 = u.valToPos(baseline.median + baseline.spread, "y", true);
    const y2 = u.valToPos(baseline.median - baseline.spread, "y", true);
    ctx.fillStyle = withAlpha(c.fine, 0.16);
    ctx.fillRect(left, Math.min(y1, y2), width, Math.abs(y2 - y1));
  }
  const ym = u.valToPos(baseline.median, "y", true);
  ctx.strokeStyle = c.fine;
  ctx.lineWidth = px(1);
  ctx.setLineDash([px(6), px(4)]);
  ctx.beginPath();
  ctx.moveTo(left, ym);
  ctx.lineTo(left + width, ym);
  ctx.stroke();
  ctx.restore();
}

/** Rows of flag tags above the plot's bottom edge; a tag goes to the lowest row where it does not overlap another. */
const TAG_ROWS = 3;

/** Flagged spans: hatch (diagonal = watch, crossed = review), outline, and a text tag "watch · label" at the bottom. */
export function drawFlags(u: uPlot, flags: readonly FlagViewDTO[], untilS: number, c: Colours, withLabel: boolean) {
  const { ctx } = u;
  const { top, height } = u.bbox;
  const spans = flags
    .map((f) => ({ f, a: xClip(u, Date.parse(f.conditionFrom) / 1000), b: xClip(u, f.conditionTo ? Date.parse(f.conditionTo) / 1000 : untilS) }))
    .filter((x) => x.b - x.a >= 1)
    .sort((p, q) => p.a - q.a);
  ctx.save();
  for (const { f, a, b } of spans) {
    const review = f.severity === "review";
    ctx.globalAlpha = 0.55;
    ctx.fillStyle = hatch(ctx, c.caution, review);
    ctx.fillRect(a, top, b - a, height);
    ctx.globalAlpha = 1;
    ctx.strokeStyle = c.caution;
    ctx.lineWidth = px(review ? 2 : 1.25);
    ctx.setLineDash(review ? [] : [px(5), px(3)]);
    ctx.strokeRect(a, top + px(1), b - a, height - px(2));
  }
  // Tags after every span, so none is hatched over. A tag is cut to its span's width but always keeps the severity
  // word (a flagged span is never a bare pattern).
  if (withLabel) {
    ctx.font = font(11, true);
    const rowEnds = new Array<number>(TAG_ROWS).fill(-Infinity);
    for (const { f, a, b } of spans) {
      const room = Math.max(b - a - px(8), ctx.measureText(f.severity).width);
      let shown = `${f.severity} · ${f.label}`;
      while (shown.length > f.severity.length + 2 && ctx.measureText(shown).width > room) shown = `${shown.slice(0, -2)}…`;
      if (ctx.measureText(shown).width > room) shown = f.severity;
      const x = a + px(5);
      const free = rowEnds.findIndex((end) => end < x);
      const r = free >= 0 ? free : TAG_ROWS - 1;
      rowEnds[r] = x + ctx.measureText(shown).width + px(8);
      label(ctx, shown, x, top + height - px(12) - r * px(15), c);
    }
  }
  ctx.restore();
}

/** Stretches without a usable value: a dotted line along the bottom of the plot (the series itself has a gap). */
export function drawUnusable(u: uPlot, spans: readonly [number, number][], c: Colours) {
  if (!spans.length) return;
  const { ctx } = u;
  const { top, height } = u.bbox;
  const y = top + height - px(3);
  ctx.save();
  ctx.strokeStyle = c.muted;
  ctx.lineWidth = px(2.5);
  ctx.setLineDash([px(2), px(3)]);
  ctx.beginPath();
  for (const [from, to] of spans) {
    const a = xClip(u, from);
    const b = xClip(u, to);
    if (b - a < 1) continue;
    ctx.moveTo(a, y);
    ctx.lineTo(b, y);
  }
  ctx.stroke();
  ctx.restore();
}

/** Clinical events: a dashed vertical line with a small downward marker and the kind as text at the top. */
export function drawAnnotations(u: uPlot, annotations: readonly AnnotationDTO[], c: Colours, withLabel: boolean) {
  const { ctx } = u;
  const { left, top, width, height } = u.bbox;
  ctx.save();
  for (const a of annotations) {
    const x = u.valToPos(Date.parse(a.occurredAt) / 1000, "x", true);
    if (x < left || x > left + width) continue;
    ctx.strokeStyle = c.ink;
    ctx.lineWidth = px(1.25);
    ctx.setLineDash([px(4), px(3)]);
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, top + height);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.fillStyle = c.ink;
    ctx.beginPath();
    ctx.moveTo(x - px(5), top);
    ctx.lineTo(x + px(5), top);
    ctx.lineTo(x, top + px(7));
    ctx.closePath();
    ctx.fill();
    if (withLabel) {
      const text = ANNOTATION_KIND_LABELS[a.kind];
      ctx.font = font(11, true);
      const w = ctx.measureText(text).width;
      // Beside the marker, or to its left near the plot's right edge.
      const tx = x + px(7) + w <= left + width ? x + px(7) : x - px(7) - w;
      label(ctx, text, tx, top + px(9), c);
    }
  }
  ctx.restore();
}

/** The zoom panel's current range on the heart-rate chart: an outline with a small tag. */
export function drawRange(u: uPlot, range: { fromS: number; toS: number } | null, c: Colours) {
  if (!range) return;
  const { ctx } = u;
  const { top, height } = u.bbox;
  const a = xClip(u, range.fromS);
  const b = Math.max(xClip(u, range.toS), a + px(2));
  ctx.save();
  ctx.strokeStyle = c.accent;
  ctx.lineWidth = px(2);
  ctx.setLineDash([]);
  ctx.strokeRect(a, top + px(1), b - a, height - px(2));
  ctx.font = font(11, true);
  ctx.fillStyle = c.accent;
  ctx.textAlign = "left";
  ctx.textBaseline = "top";
  const text = "zoom";
  const w = ctx.measureText(text).width;
  ctx.fillText(text, Math.max(u.bbox.left, Math.min(a + px(3), u.bbox.left + u.bbox.width - w)), top + px(20));
  ctx.restore();
}

/** Whether a night's two ends lie in different offsets (a DST night): then every tick shows its zone. */
export const offsetChanges = (fromS: number, toS: number, timeZone: string) =>
  formatInTimeZone(fromS * 1000, timeZone, "xxx") !== formatInTimeZone(toS * 1000, timeZone, "xxx");

/** The time axis in the unit's zone: "HH:mm", with the zone abbreviation on a DST night. */
export function timeAxis(c: Colours, timeZone: string, showZone: boolean, withSeconds = false): uPlot.Axis {
  const pattern = `HH:mm${withSeconds ? ":ss" : ""}${showZone ? " zzz" : ""}`;
  return {
    ...axisStyle(c),
    size: 30,
    space: showZone ? 90 : 60,
    values: (_u, splits) => splits.map((s) => formatInTimeZone(s * 1000, timeZone, pattern)),
  };
}

/** uPlot's tzDate for the unit's zone (ticks fall on local whole hours and minutes). */
export const tzDate = (timeZone: string) => (ts: number) => uPlot.tzDate(new Date(ts * 1e3), timeZone);
