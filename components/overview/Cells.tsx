// The Ward overview's cells. Every state is written in words and marked with a shape; colour only follows them.
import { StreamIcon } from "@/components/StreamIcon";
import type { OverviewBedDTO, OverviewStreamDTO, OverviewValueDTO, OverviewWindowDTO } from "@/lib/review/overview";
import { describeChange, formatClock, formatNumber, withUnit, type IndexColumn } from "./format";

/** An index value with its unit, the arrow and signed change from the patient's own baseline, and the baseline. */
export function ValueCell({ v, col, dimmed }: { v: OverviewValueDTO | undefined; col: IndexColumn; dimmed: boolean }) {
  if (!v || v.value === null) {
    return (
      <td className="text-muted">
        <span aria-hidden="true" className="text-xl 2xl:text-3xl">—</span>
        <span className="block text-xs 2xl:text-sm">
          <span className="sr-only">{col.spoken}: </span>no value
        </span>
        {v?.reason && <span className="sr-only">: {v.reason}</span>}
      </td>
    );
  }
  const change = v.delta === null ? null : describeChange(v.delta, col);
  return (
    <td className={dimmed ? "text-muted" : ""}>
      <span className={`block text-xl font-bold tabular-nums 2xl:text-3xl ${dimmed ? "" : "text-ink"}`}>
        {formatNumber(v.value, col.decimals)}
        {col.unit && <span className="ml-1 text-sm font-normal 2xl:text-base">{col.unit}</span>}
      </span>
      {change ? (
        <span className="block text-sm tabular-nums 2xl:text-base">
          <span aria-hidden="true">{change.arrow} </span>
          <span aria-hidden="true">{change.text}</span>
          <span className="sr-only">{change.spoken}</span>
        </span>
      ) : (
        <span className="block text-xs text-muted 2xl:text-sm">no baseline yet</span>
      )}
      {v.baselineMedian !== null && (
        <span className="block text-xs text-muted 2xl:text-sm">
          baseline {withUnit(formatNumber(v.baselineMedian, col.decimals), col.unit)}
        </span>
      )}
    </td>
  );
}

const GRADE = {
  good: { shape: "●", word: "Good" },
  limited: { shape: "◐", word: "Limited" },
  unusable: { shape: "○", word: "Unusable" },
} as const;

export function QualityCell({ latest, timeZone, asOf }: { latest: OverviewWindowDTO | null; timeZone: string; asOf: string }) {
  if (!latest) return <td className="text-sm text-muted">No window yet</td>;
  const g = GRADE[latest.grade];
  return (
    <td className="text-sm">
      <span className="block font-bold text-ink 2xl:text-base">
        <span aria-hidden="true">{g.shape} </span>
        {g.word}
      </span>
      {latest.coverage !== null && <span className="block text-muted">coverage {Math.round(latest.coverage * 100)} %</span>}
      <span className="block text-muted">
        window to <time dateTime={latest.windowEnd}>{formatClock(latest.windowEnd, timeZone, asOf)}</time>
      </span>
      {latest.qualityReasons.length > 0 && (
        <ul className="mt-1 text-xs text-muted">
          {latest.qualityReasons.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
      )}
    </td>
  );
}

export function StreamCell({ stream, timeZone, asOf }: { stream: OverviewStreamDTO; timeZone: string; asOf: string }) {
  const text =
    stream.state === "live"
      ? "Live"
      : stream.state === "no_device"
        ? "No device"
        : stream.state === "leads_off"
          ? "Leads off"
          : stream.since
            ? `Stale since ${formatClock(stream.since, timeZone, asOf)}`
            : "Stale: no beat received";
  const tag =
    stream.state === "live"
      ? "border-transparent text-ink"
      : "border-dashed border-muted bg-surface text-ink";
  return (
    <td className="text-sm 2xl:text-base">
      <span className={`inline-flex items-center gap-1.5 rounded-md border px-2 py-1 font-bold ${tag}`}>
        <StreamIcon state={stream.state} />
        {text}
      </span>
      {stream.state === "leads_off" && stream.lastBeatAt && (
        <span className="block text-xs text-muted 2xl:text-sm">
          last beat <time dateTime={stream.lastBeatAt}>{formatClock(stream.lastBeatAt, timeZone, asOf)}</time>
        </span>
      )}
    </td>
  );
}

const SEVERITY = {
  review: { shape: "◆", word: "Review", box: "border-accent" },
  watch: { shape: "◇", word: "Watch", box: "border-line" },
} as const;

export function FlagsCell({ flags }: { flags: OverviewBedDTO["flags"] }) {
  if (!flags.count || !flags.highestSeverity) return <td className="text-sm text-muted">None open</td>;
  const s = SEVERITY[flags.highestSeverity];
  return (
    <td className="text-sm 2xl:text-base">
      <span className={`inline-flex items-center gap-1.5 rounded-md border-2 px-2 py-0.5 font-bold text-ink ${s.box}`}>
        <span aria-hidden="true">{s.shape}</span>
        {flags.count} open<span className="sr-only">, highest severity</span>
        <span className="font-normal">· {s.word}</span>
      </span>
      <ul className="mt-1 text-xs text-muted 2xl:text-sm">
        {flags.labels.map((l) => (
          <li key={l}>{l}</li>
        ))}
      </ul>
    </td>
  );
}
