// Night review: one patient's night — stacked trends on one time axis, own-baseline band, flagged windows, clinical
// events, and the heart rate zoomed from the whole night to single beats. Each view is audited.
import { formatInTimeZone } from "date-fns-tz";
import { auditAs } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { chosenNight, nightQuerySchema, nightWindows } from "@/lib/review/night-windows";
import { guardStayPage } from "@/lib/review/stay-guard";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { Notice } from "@/components/Notice";
import { NightPicker } from "@/components/night/NightPicker";
import { NightReview } from "@/components/night/NightReview";

export const metadata = { title: "Night review" };

/** Hours from a local start to a local end time ("22:00" → "06:00" is 8), as the clock on the wall counts them. */
function wallClockHours(startsAt: string, endsAt: string): number {
  const minutes = (t: string) => Number(t.slice(0, 2)) * 60 + Number(t.slice(3, 5));
  return (((minutes(endsAt) - minutes(startsAt)) % 1440) + 1440) % 1440 / 60 || 24;
}

export default async function NightReviewPage({ params, searchParams }: {
  params: Promise<{ stayId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { actor, stay } = await guardStayPage("trends.view", (await params).stayId);
  const query = nightQuerySchema.safeParse(await searchParams);
  const night = chosenNight(stay, query.success ? query.data.night : undefined);
  const dto = await nightWindows(stay, night);
  await auditAs(actor, {
    action: "night.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { night: night.night, via: "page" },
  });

  const tz = stay.night.timeZone;
  const hours = Number.isInteger(night.hours) ? `${night.hours} h` : `${night.hours.toFixed(1)} h`;
  const clockChange = night.hours !== wallClockHours(stay.night.startsAt, stay.night.endsAt);
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <p className="text-sm text-muted">Night review · {stay.unitName}</p>
          <h1>
            Bed {stay.bedLabel} · {stay.displayName} <span className="text-base font-normal text-muted">({stay.recordNumber})</span>
          </h1>
          <p>
            Night of {formatInTimeZone(night.from, tz, "EEE d MMM yyyy")}:{" "}
            <span className="font-bold">
              {formatInTimeZone(night.from, tz, "HH:mm zzz")} → {formatInTimeZone(night.to, tz, "HH:mm zzz")}, {hours}
            </span>
            {clockChange && <span className="text-muted"> (the clocks changed this night)</span>}
          </p>
        </div>
        <NightPicker stayId={stay.stayId} current={night.night} nights={dto.nights} timeZone={tz} />
      </div>
      <DecisionSupportCaution />
      {!query.success && <Notice tone="info">That night could not be read from the address; showing the latest night instead.</Notice>}
      <NightReview
        key={night.night}
        initial={dto}
        stay={{ stayId: stay.stayId, admittedAt: stay.admittedAt, dischargedAt: stay.dischargedAt }}
        canAnnotate={can(actor.grants, "annotations.write", stay.unitId)}
      />
    </div>
  );
}
