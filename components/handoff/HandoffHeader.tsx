// The head of every Handoff summary page, on screen and at the top of each printed sheet: what, whose, which night
// (local times, zone, real length), how current, and the decision-support caution.
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import type { NightDTO } from "@/lib/review/handoff";
import { DIRECTION_RULE } from "@/lib/review/handoff";
import { nightLength, nightSpan } from "./format";
import { PrintStamp } from "./PrintStamp";

export function HandoffHeader({ context, title, night, asOf }: { context: string; title: React.ReactNode; night: NightDTO; asOf: string }) {
  return (
    <div className="space-y-3 print:space-y-1">
      <div className="flex flex-wrap items-end justify-between gap-x-6 gap-y-1">
        <div>
          <p className="text-sm text-muted">Handoff summary · {context}</p>
          <h1 className="print:text-lg">{title}</h1>
          <p>
            Night of {nightSpan(night, night.timeZone)} · {nightLength(night, night.timeZone)}
            {night.inProgress && <strong> · in progress: figures cover the night so far</strong>}
          </p>
        </div>
        <PrintStamp asOf={asOf} timeZone={night.timeZone} />
      </div>
      <DecisionSupportCaution className="print:py-1 print:text-xs" />
    </div>
  );
}

/** The arrow rule, stated once on each page beside the arrows it explains. */
export function DirectionRule() {
  return (
    <p className="text-sm text-muted">
      <strong className="text-ink">How to read the arrows:</strong> {DIRECTION_RULE} The baseline is the median and spread of the
      patient’s first valid hours in this stay; windows graded unusable show no value and are left out.
    </p>
  );
}
