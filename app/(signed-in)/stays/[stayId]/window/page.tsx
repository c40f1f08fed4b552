// Window detail: one 5-min window of a patient — the stored values with their parameters and sources, the signal
// quality, and the plots behind the numbers (tachogram, Poincaré, DFA, MSE, spectrum), recomputed from the beats by
// the engine. The Research panel below loads only when opened. Each view is audited.
import { formatInTimeZone } from "date-fns-tz";
import Link from "next/link";
import { auditAs } from "@/lib/auth/guard";
import { explanationOf } from "@/lib/review/index-explanations";
import { guardStayPage } from "@/lib/review/stay-guard";
import { windowDetail, windowQuerySchema, type IndexValueDTO, type WindowDetailDTO } from "@/lib/review/window-detail";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { Notice } from "@/components/Notice";
import { ChartUnavailable } from "@/components/window/ChartFigure";
import { DfaChart } from "@/components/window/DfaChart";
import { MseChart } from "@/components/window/MseChart";
import { PoincareChart } from "@/components/window/PoincareChart";
import { GradeTag, QualityPanel } from "@/components/window/QualityPanel";
import { ResearchPanel } from "@/components/window/ResearchPanel";
import { SpectrumChart } from "@/components/window/SpectrumChart";
import { TachogramChart } from "@/components/window/TachogramChart";
import { ValueCard } from "@/components/window/ValueCard";

export const metadata = { title: "Window detail" };

const GROUPS: { title: string; keys: string[] }[] = [
  { title: "Time domain", keys: ["hr", "mean_nn", "sdnn", "rmssd", "sdsd", "nn50", "pnn50"] },
  { title: "Poincaré", keys: ["sd1", "sd2", "sd1_sd2"] },
  { title: "Entropy and fractal scaling", keys: ["sampen", "dfa_alpha1"] },
  { title: "Frequency domain", keys: ["vlf", "lf", "hf", "lf_hf", "lf_nu", "hf_nu", "lf_peak_hz", "hf_peak_hz"] },
];

/** The section of the stored parameter document a value's method used ("methods.sampen" → document.methods.sampen). */
function documentSection(doc: WindowDetailDTO["parameters"], key: string | null): unknown {
  if (!doc || !key) return null;
  return key.split(".").reduce<unknown>((o, k) => (o && typeof o === "object" ? (o as Record<string, unknown>)[k] : null), doc);
}

function Values({ values, doc, limited }: { values: IndexValueDTO[]; doc: WindowDetailDTO["parameters"]; limited: boolean }) {
  return (
    <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
      {values.map((v) => (
        <ValueCard key={v.key} value={v} explanation={explanationOf(v.key)} documentParams={documentSection(doc, v.documentKey)} limited={limited} />
      ))}
    </dl>
  );
}

export default async function WindowDetailPage({ params, searchParams }: {
  params: Promise<{ stayId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { actor, stay } = await guardStayPage("trends.view", (await params).stayId);
  const query = windowQuerySchema.safeParse(await searchParams);
  const asked = query.success ? (query.data.start ?? null) : null;
  // An address naming no stored window falls back, calmly, to the latest window.
  const dto = (asked ? await windowDetail(stay, asked) : null) ?? (await windowDetail(stay, null))!;
  await auditAs(actor, {
    action: "window.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { window_start: dto.window?.start ?? null, via: "page" },
  });
  const tz = stay.night.timeZone;
  const heading = (
    <>
      <p className="text-sm text-muted">Window detail · {stay.unitName}</p>
      <h1>
        Bed {stay.bedLabel} · {stay.displayName} <span className="text-base font-normal text-muted">({stay.recordNumber})</span>
      </h1>
    </>
  );

  if (dto.window === null) {
    return (
      <div className="space-y-4">
        <div>{heading}</div>
        <DecisionSupportCaution />
        <Notice tone="info">{dto.message}</Notice>
        <p>
          <Link href={`/stays/${stay.stayId}/night`}>Back to the Night review</Link>
        </p>
      </div>
    );
  }

  const w = dto.window;
  const limited = w.grade === "limited";
  const at = (iso: string) => `/stays/${stay.stayId}/window?start=${encodeURIComponent(iso)}`;
  const { plots, plotReasons } = dto;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          {heading}
          <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <span className="font-bold">
              {formatInTimeZone(w.start, tz, "EEE d MMM yyyy, HH:mm")}–{formatInTimeZone(w.end, tz, "HH:mm zzz")}
            </span>
            <GradeTag grade={w.grade} />
          </p>
        </div>
        <nav aria-label="Windows" className="flex flex-wrap gap-2">
          <Link className="btn-secondary" href={`/stays/${stay.stayId}/night?night=${w.night}`}>
            <span aria-hidden="true">←</span> Night review of {w.night}
          </Link>
          {dto.neighbours.previous ? (
            <Link className="btn-secondary" href={at(dto.neighbours.previous)}>Previous window</Link>
          ) : (
            <span className="btn-secondary opacity-60" aria-disabled="true">No earlier window</span>
          )}
          {dto.neighbours.next ? (
            <Link className="btn-secondary" href={at(dto.neighbours.next)}>Next window</Link>
          ) : (
            <span className="btn-secondary opacity-60" aria-disabled="true">No later window</span>
          )}
        </nav>
      </div>
      <DecisionSupportCaution />
      {asked && Date.parse(asked) !== Date.parse(w.start) && <Notice tone="info">No stored window starts at the time in the address; showing the latest window instead.</Notice>}
      {!query.success && <Notice tone="info">The window could not be read from the address; showing the latest window instead.</Notice>}
      {dto.recomputed.available ? (
        dto.recomputed.matchesStored ? (
          <p className="text-sm text-muted">
            Plots recomputed now from the beats by engine version {w.algorithmVersion}; they give the stored values.
          </p>
        ) : (
          <Notice tone="problem">
            Recomputing from the beats now does not give the stored values for {dto.recomputed.differing.join(", ")}: beats have arrived or been
            corrected since this window was computed. The values below are the stored ones; the plots show the beats as they are now.
          </Notice>
        )
      ) : (
        <Notice tone="info">Plots are not available: {dto.recomputed.reason}. The stored values are shown.</Notice>
      )}

      <QualityPanel id="window-quality" quality={w.quality} />

      <section aria-labelledby="values-title" className="space-y-4">
        <h2 id="values-title">Values of this window</h2>
        {w.grade === "unusable" && <p className="text-sm">This window&apos;s signal is unusable, so no index value is shown. The reasons are in the quality panel above.</p>}
        {GROUPS.map((g) => (
          <div key={g.title} className="space-y-2">
            <h3 className="text-base font-bold">{g.title}</h3>
            <Values values={g.keys.map((k) => w.values.find((v) => v.key === k)!).filter(Boolean)} doc={dto.parameters} limited={limited} />
          </div>
        ))}
      </section>

      <section aria-labelledby="plots-title" className="space-y-4">
        <h2 id="plots-title">Plots</h2>
        {plots.tachogram ? <TachogramChart data={plots.tachogram} timeZone={tz} /> : <ChartUnavailable title="Tachogram" reason={plotReasons.tachogram ?? "no beats"} />}
        <div className="grid gap-4 lg:grid-cols-2">
          {plots.poincare ? <PoincareChart data={plots.poincare} /> : <ChartUnavailable title="Poincaré plot" reason={plotReasons.poincare ?? "no beats"} />}
          {plots.spectrum ? <SpectrumChart data={plots.spectrum} /> : <ChartUnavailable title="Power spectrum" reason={plotReasons.spectrum ?? "no beats"} />}
          {plots.dfa ? <DfaChart data={plots.dfa} /> : <ChartUnavailable title="Detrended fluctuation analysis" reason={plotReasons.dfa ?? "no beats"} />}
          {plots.mse ? <MseChart data={plots.mse} /> : <ChartUnavailable title="Multiscale entropy (the hour around this window)" reason={plotReasons.mse ?? "no beats"} />}
        </div>
      </section>

      <section aria-labelledby="hour-title" className="space-y-3">
        <h2 id="hour-title">The hour around this window</h2>
        <p className="text-sm">
          {formatInTimeZone(dto.hour.start, tz, "HH:mm")}–{formatInTimeZone(dto.hour.end, tz, "HH:mm zzz")}. {dto.hour.note} MSE, DFA α2 and the
          Research panel use this hour, because 5 minutes of beats are too few for them.
        </p>
        {dto.hour.quality && <QualityPanel id="hour-quality" quality={dto.hour.quality} title="Signal quality of the hour" />}
        {dto.hour.values.length > 0 && <Values values={dto.hour.values} doc={dto.parameters} limited={dto.hour.quality?.grade === "limited"} />}
      </section>

      <ResearchPanel stayId={stay.stayId} start={w.start} timeZone={tz} />
    </div>
  );
}
