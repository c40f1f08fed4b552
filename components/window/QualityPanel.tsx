// Signal quality of the window (DOMAIN §2.1): the grade in words and shape, why it is not good, and the measures
// behind it. An unusable window shows no index value.
import type { QualityDTO } from "@/lib/review/window-detail";
import { fmt, pct } from "./chart-kit";

const GRADE_WORDS: Record<QualityDTO["grade"], string> = {
  good: "Good signal",
  limited: "Limited signal — values shown greyed, read with care",
  unusable: "Unusable signal — no values shown",
};

export function GradeTag({ grade }: { grade: QualityDTO["grade"] }) {
  const style = grade === "good" ? "border-fine text-fine" : grade === "limited" ? "border-dashed border-muted text-muted" : "border-dotted border-problem text-problem";
  const mark = grade === "good" ? "●" : grade === "limited" ? "◐" : "○";
  return (
    <span className={`inline-flex items-center gap-1 rounded-md border-2 px-2 py-0.5 text-sm font-bold ${style}`}>
      <span aria-hidden="true">{mark}</span>
      Quality: {grade}
    </span>
  );
}

export function QualityPanel({ id, quality, title = "Signal quality" }: { id: string; quality: QualityDTO; title?: string }) {
  const rows: [string, string][] = [
    ["Coverage (share of the window covered by NN intervals)", pct(quality.coverage)],
    ["Beats edited by cleaning", pct(quality.shareEdited)],
    ["Ectopic beats", pct(quality.shareEctopic)],
    ["Longest gap", quality.longestGapS === null ? "—" : `${fmt(quality.longestGapS, 1)} s`],
    ["NN intervals used / intervals received", `${quality.nBeats ?? "—"} / ${quality.nInputBeats ?? "—"}`],
    ["Time the device reported poor signal or lead-off", pct(quality.devicePoorShare)],
  ];
  return (
    <section aria-labelledby={`${id}-title`} className="card space-y-3 p-4">
      <div className="flex flex-wrap items-center gap-3">
        <h2 id={`${id}-title`}>{title}</h2>
        <GradeTag grade={quality.grade} />
      </div>
      <p className="text-sm">{GRADE_WORDS[quality.grade]}.</p>
      {quality.reasons.length > 0 && (
        <ul className="list-disc pl-5 text-sm">
          {quality.reasons.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
      )}
      <table>
        <caption className="sr-only">{title}: measures</caption>
        <tbody>
          {rows.map(([k, v]) => (
            <tr key={k}>
              <th scope="row" className="font-normal">{k}</th>
              <td className="font-mono">{v}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
