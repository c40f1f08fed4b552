// How the Ward overview writes its values: index names, units and decimals, the change from baseline as an arrow plus
// signed text (shape and words, never colour alone), times in the unit's zone, and the sort order of each column.
import { formatInTimeZone } from "date-fns-tz";
import type { OverviewBedDTO, OverviewIndexKey } from "@/lib/review/overview";
import type { SortDirection } from "@/components/table/SortableHeader";

export interface IndexColumn {
  label: string;
  /** Spoken name, where the visible one is an abbreviation or symbol. */
  spoken: string;
  /** Unit after the number; "" for dimensionless indices. */
  unit: string;
  decimals: number;
}

/** Column order of the indices; keyed by the repository's keys, so a key added there must be described here. */
export const INDEX_COLUMNS: Record<OverviewIndexKey, IndexColumn> = {
  hr: { label: "HR", spoken: "Heart rate", unit: "bpm", decimals: 0 },
  rmssd: { label: "RMSSD", spoken: "RMSSD", unit: "ms", decimals: 0 },
  dfa_alpha1: { label: "DFA α1", spoken: "DFA alpha 1", unit: "", decimals: 2 },
  sampen: { label: "SampEn", spoken: "Sample entropy", unit: "", decimals: 2 },
};
export const INDEX_KEYS = Object.keys(INDEX_COLUMNS) as OverviewIndexKey[];

const MINUS = "\u2212";

export function formatNumber(v: number, decimals: number): string {
  const s = v.toFixed(decimals);
  return s.startsWith("-") ? `${MINUS}${s.slice(1)}` : s;
}

export const withUnit = (text: string, unit: string) => (unit ? `${text} ${unit}` : text);

/** "▼ −12 ms from baseline": the arrow's shape and the sign both say the direction. */
export function describeChange(delta: number, col: IndexColumn): { arrow: string; text: string; spoken: string } {
  const rounded = Number(delta.toFixed(col.decimals));
  const size = withUnit(formatNumber(Math.abs(rounded), col.decimals), col.unit);
  if (rounded === 0) return { arrow: "=", text: "same as baseline", spoken: "same as baseline" };
  return rounded > 0
    ? { arrow: "▲", text: `+${size} from baseline`, spoken: `${size} above baseline` }
    : { arrow: "▼", text: `${MINUS}${size} from baseline`, spoken: `${size} below baseline` };
}

/** "02:14 EST", with the weekday when the instant is more than 20 h before `asOf`. */
export function formatClock(iso: string, timeZone: string, asOf?: string): string {
  const old = asOf !== undefined && Date.parse(asOf) - Date.parse(iso) > 20 * 3_600_000;
  return formatInTimeZone(iso, timeZone, old ? "EEE HH:mm zzz" : "HH:mm zzz");
}

export type SortKey = "bed" | "patient" | OverviewIndexKey | `${OverviewIndexKey}:change` | "quality" | "stream" | "flags";

/** The direction a column sorts in on its first click: most flags first, everything else smallest first. */
export const FIRST_DIRECTION: Partial<Record<SortKey, SortDirection>> = { flags: "descending" };

const GRADE_RANK = { good: 0, limited: 1, unusable: 2 } as const;
const STREAM_RANK = { live: 0, leads_off: 1, stale: 2, no_device: 3 } as const;
const SEVERITY_RANK = { watch: 1, review: 2 } as const;

/** A bed's value for a column; null sorts last in both directions. */
export function sortValue(b: OverviewBedDTO, key: SortKey): number | string | null {
  switch (key) {
    case "bed":
      return null; // the unit's own bed order, kept by the stable sort
    case "patient":
      return b.stay?.displayName ?? null;
    case "quality":
      return b.latest ? GRADE_RANK[b.latest.grade] : null;
    case "stream":
      return STREAM_RANK[b.stream.state];
    case "flags":
      return b.stay ? (b.flags.highestSeverity ? SEVERITY_RANK[b.flags.highestSeverity] : 0) * 10_000 + b.flags.count : null;
    default: {
      const [index, part] = key.split(":") as [OverviewIndexKey, "change" | undefined];
      const v = b.latest?.values[index];
      return (part === "change" ? v?.delta : v?.value) ?? null;
    }
  }
}

/** Beds sorted by a column; ties (and the "bed" column) keep the unit's bed order. */
export function sortBeds(beds: readonly OverviewBedDTO[], key: SortKey, direction: SortDirection): OverviewBedDTO[] {
  const sign = direction === "ascending" ? 1 : -1;
  const order = new Map(beds.map((b, i) => [b.bedId, i]));
  return [...beds].sort((a, b) => {
    if (key === "bed") return sign * (order.get(a.bedId)! - order.get(b.bedId)!);
    const va = sortValue(a, key);
    const vb = sortValue(b, key);
    if (va === null || vb === null) {
      if (va !== vb) return va === null ? 1 : -1;
    } else if (va !== vb) {
      return sign * (typeof va === "string" ? va.localeCompare(String(vb)) : va - (vb as number));
    }
    return order.get(a.bedId)! - order.get(b.bedId)!;
  });
}
