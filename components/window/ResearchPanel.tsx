"use client";
// The Research panel: chaos and power-law measures on the hour around the window, each with its caveat. Closed by
// default; the measures are computed (and the read audited) only when someone opens it. Research only: none of these
// numbers is stored or can raise a flag.
import { formatInTimeZone } from "date-fns-tz";
import { useMemo, useState } from "react";
import useSWR from "swr";
import { explanationOf } from "@/lib/review/index-explanations";
import type { ResearchDTO, ResearchPart } from "@/lib/review/research";
import type { NoWindowsDTO } from "@/lib/review/window-detail";
import { ChartFigure } from "./ChartFigure";
import { fmt } from "./chart-kit";
import { LegendItem } from "./ShapeIcon";
import { XYChart, type XYSeries } from "./XYChart";

async function fetchResearch(url: string): Promise<ResearchDTO | NoWindowsDTO> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { message?: string } | null;
    throw new Error(body?.message ?? `research request failed (${res.status})`);
  }
  return (await res.json()) as ResearchDTO | NoWindowsDTO;
}

function Caveat({ text }: { text: string }) {
  return (
    <p className="rounded-md border-l-4 border-caution bg-caution-surface px-3 py-2 text-sm">
      <strong>Caveat: </strong>
      {text}
    </p>
  );
}

/** Heading, explanation with citation, value or reason, caveat, then the chart and its table. */
function Measure<V>(props: { id: string; part: ResearchPart<V> | null; always?: false; children: (v: V) => React.ReactNode }): React.ReactNode;
/** `always`: the children render without a value too (the power-law CCDF is worth seeing when no fit is possible). */
function Measure<V>(props: { id: string; part: ResearchPart<V> | null; always: true; children: (v: V | null) => React.ReactNode }): React.ReactNode;
function Measure<V>({ id, part, always, children }: { id: string; part: ResearchPart<V> | null; always?: boolean; children: (v: V) => React.ReactNode }) {
  const e = explanationOf(id);
  return (
    <section aria-labelledby={`research-${id}`} className="space-y-2">
      <h3 id={`research-${id}`} className="text-base font-bold">
        {e.label} <span className="text-sm font-normal text-muted">(research only)</span>
      </h3>
      <p className="text-sm text-muted">
        {e.explanation} <cite className="not-italic text-quiet">{e.citation}</cite>
      </p>
      {part === null ? null : part.value === null ? (
        <>
          <p className="text-sm">
            <span aria-hidden="true">— </span>No value: {part.reason}.
          </p>
          {always && (children as (v: V | null) => React.ReactNode)(null)}
        </>
      ) : (
        children(part.value)
      )}
      {part && <Caveat text={part.caveat} />}
      {part && (
        <p className="text-xs text-muted">
          Method <span className="font-mono">{part.method}</span>, algorithm version <span className="font-mono">{part.version}</span>.
        </p>
      )}
    </section>
  );
}

function Results({ r, timeZone }: { r: ResearchDTO; timeZone: string }) {
  const d2 = r.correlationDimension?.value;
  const lyap = r.lyapunov?.value;
  const fnn = r.falseNeighbours?.value;
  const pl = r.powerLaw;
  const d2Series = useMemo((): XYSeries[] => {
    if (!d2) return [];
    const out: XYSeries[] = [{ label: "Slope", kind: "line+points", colour: "accent", shape: "circle", x: d2.m, y: d2.slopes }];
    out.push({ label: "Eckmann–Ruelle bound", kind: "dashed", colour: "quiet", x: [d2.m[0]!, d2.m[d2.m.length - 1]!], y: [d2.eckmannRuelleBound, d2.eckmannRuelleBound] });
    if (d2.d2 !== null) out.push({ label: "D2 plateau", kind: "line", colour: "caution", x: [d2.m[0]!, d2.m[d2.m.length - 1]!], y: [d2.d2, d2.d2] });
    return out;
  }, [d2]);
  const lyapSeries = useMemo(
    (): XYSeries[] =>
      lyap
        ? [
            { label: "Mean ln divergence", kind: "line+points", colour: "accent", shape: "circle", x: lyap.steps, y: lyap.meanLogDivergence },
            { label: "Fitted initial slope", kind: "dashed", colour: "caution", x: lyap.steps, y: lyap.fitLine },
          ]
        : [],
    [lyap],
  );
  const fnnSeries = useMemo(
    (): XYSeries[] =>
      fnn
        ? [
            { label: "False neighbours", kind: "line+points", colour: "accent", shape: "square", x: fnn.dims, y: fnn.falseFraction.map((f) => 100 * f) },
            { label: "Threshold", kind: "dashed", colour: "quiet", x: [fnn.dims[0]!, fnn.dims[fnn.dims.length - 1]!], y: [100 * fnn.threshold, 100 * fnn.threshold] },
          ]
        : [],
    [fnn],
  );
  const ccdfSeries = useMemo((): XYSeries[] => {
    if (!pl) return [];
    const out: XYSeries[] = [{ label: "Run sizes", kind: "points", colour: "muted", shape: "circle", x: pl.ccdf.x, y: pl.ccdf.p }];
    const fit = pl.fit.value;
    if (fit) {
      out.push({ label: "Power law", kind: "line", colour: "accent", x: fit.line.x, y: fit.line.powerLaw });
      out.push({ label: "Lognormal", kind: "dashed", colour: "caution", x: fit.line.x, y: fit.line.lognormal });
    }
    return out;
  }, [pl]);

  return (
    <div className="space-y-6">
      <p className="text-sm">
        Computed on the hour {formatInTimeZone(r.hour.start, timeZone, "HH:mm")}–{formatInTimeZone(r.hour.end, timeZone, "HH:mm zzz")} ({r.hour.beats} NN
        intervals, quality {r.hour.grade ?? "unknown"}). {r.hour.note} Random parts are seeded from the window (seed {r.seed}), so reopening gives the same result.
      </p>
      {r.embedding && (
        <section aria-labelledby="research-embedding" className="space-y-2">
          <h3 id="research-embedding" className="text-base font-bold">
            Embedding <span className="text-sm font-normal text-muted">(research only)</span>
          </h3>
          <p className="text-sm">
            Delay τ = {r.embedding.tau} beat{r.embedding.tau === 1 ? "" : "s"} ({r.embedding.tauSource}); dimension m = {r.embedding.m} ({r.embedding.mSource}).
          </p>
          <Caveat text={r.embedding.caveat} />
        </section>
      )}

      <Measure id="d2" part={r.correlationDimension}>
        {(v) => (
          <ChartFigure
            id="research-d2-chart"
            title="Correlation dimension against embedding dimension"
            summary={
              <>
                Verdict: <strong>{v.verdict}</strong>
                {v.d2 !== null ? `, D2 = ${fmt(v.d2, 2)} from m = ${v.saturationDim}` : v.d2Reason ? ` — ${v.d2Reason}` : ""}. The series can show at most
                D2 = {fmt(v.eckmannRuelleBound, 1)} (Eckmann–Ruelle bound, {v.vectors} vectors).
              </>
            }
            legend={
              <>
                <LegendItem shape="circle" className="text-accent">Slope of ln C(r) against ln r at each m (circles)</LegendItem>
                <LegendItem shape="dashed" className="text-quiet">Eckmann–Ruelle bound (dashed)</LegendItem>
                {v.d2 !== null && <LegendItem shape="line" className="text-caution">D2 plateau (solid)</LegendItem>}
              </>
            }
            tableLabel="Table of slopes per embedding dimension"
            table={
              <table>
                <thead><tr><th scope="col">m</th><th scope="col">Slope</th></tr></thead>
                <tbody>{v.m.map((m, i) => <tr key={m}><td>{m}</td><td>{fmt(v.slopes[i], 2)}</td></tr>)}</tbody>
              </table>
            }
          >
            <XYChart series={d2Series} xLabel="Embedding dimension m" yLabel="Slope" height={220} />
          </ChartFigure>
        )}
      </Measure>

      <Measure id="lyapunov" part={r.lyapunov}>
        {(v) => (
          <ChartFigure
            id="research-lyapunov-chart"
            title="Divergence of nearby trajectories"
            summary={
              <>
                λ1 = {v.perBeat === null ? `— (${v.perBeatReason})` : `${fmt(v.perBeat, 3)} per beat`}
                {v.perSecond !== null ? `, ${fmt(v.perSecond, 3)} per second` : ""}; fitted over steps {v.fitFrom ?? "—"}–{v.fitTo ?? "—"}
                {v.r2 !== null ? ` (r² = ${fmt(v.r2, 3)})` : ""}; Theiler window {v.theiler} beats.
              </>
            }
            legend={
              <>
                <LegendItem shape="circle" className="text-accent">Mean ln distance after i steps (circles)</LegendItem>
                <LegendItem shape="dashed" className="text-caution">Fitted initial slope = λ1 (dashed)</LegendItem>
              </>
            }
            tableLabel="Table of the divergence curve"
            table={
              <table>
                <thead><tr><th scope="col">Step i (beats)</th><th scope="col">Mean ln d(i)</th><th scope="col">Fit</th></tr></thead>
                <tbody>{v.steps.map((s, i) => <tr key={s}><td>{s}</td><td>{fmt(v.meanLogDivergence[i], 3)}</td><td>{fmt(v.fitLine[i], 3)}</td></tr>)}</tbody>
              </table>
            }
          >
            <XYChart series={lyapSeries} xLabel="Step i (beats)" yLabel="Mean ln d(i)" height={220} />
          </ChartFigure>
        )}
      </Measure>

      <Measure id="fnn" part={r.falseNeighbours}>
        {(v) => (
          <ChartFigure
            id="research-fnn-chart"
            title="False nearest neighbours"
            summary={<>Embedding dimension: {v.dimension ?? `none found (${v.dimensionReason})`}; threshold {fmt(100 * v.threshold, 0)} % false neighbours.</>}
            legend={
              <>
                <LegendItem shape="square" className="text-accent">Share of false neighbours at each m (squares)</LegendItem>
                <LegendItem shape="dashed" className="text-quiet">Threshold (dashed)</LegendItem>
              </>
            }
            tableLabel="Table of false neighbours per dimension"
            table={
              <table>
                <thead><tr><th scope="col">m</th><th scope="col">False neighbours</th></tr></thead>
                <tbody>{v.dims.map((m, i) => <tr key={m}><td>{m}</td><td>{fmt(100 * v.falseFraction[i]!, 1)} %</td></tr>)}</tbody>
              </table>
            }
          >
            <XYChart series={fnnSeries} xLabel="Embedding dimension m" yLabel="False neighbours (%)" height={220} />
          </ChartFigure>
        )}
      </Measure>

      <Measure id="surrogate" part={r.surrogate}>
        {(v) => (
          <div className="space-y-2 text-sm">
            <p>
              Structure beyond linear correlation: <strong>{v.structureBeyondLinear}</strong>. The data&apos;s |{v.statistic}| = {fmt(Math.abs(v.dataStatistic), 4)};{" "}
              {v.atLeastAsExtreme} of {v.surrogates} surrogates were at least as extreme, so p ≤ {fmt(v.pValueBound, 3)} (tested on {v.segmentLength} beats).
            </p>
            <details>
              <summary className="cursor-pointer text-accent">Table of the surrogates&apos; statistics</summary>
              <table className="mt-2">
                <thead><tr><th scope="col">Series</th><th scope="col">|{v.statistic}|</th></tr></thead>
                <tbody>
                  <tr><th scope="row">Data</th><td>{fmt(Math.abs(v.dataStatistic), 4)}</td></tr>
                  {v.surrogateStatistics.map((s, i) => <tr key={i}><td>Surrogate {i + 1}</td><td>{fmt(Math.abs(s), 4)}</td></tr>)}
                </tbody>
              </table>
            </details>
          </div>
        )}
      </Measure>

      {pl && (
        <Measure id="power_law" part={pl.fit} always>
          {(v) => (
            <ChartFigure
              id="research-ccdf-chart"
              title="Run sizes: complementary cumulative distribution (log-log)"
              summary={
                v ? (
                  <>
                    α = {fmt(v.alpha, 2)} ± {fmt(v.alphaSE, 2)} above x_min = {fmt(v.xmin, 0)} ms ({v.nTail} of {pl.runs} runs in the tail, spanning {fmt(v.decades, 2)} decades).{" "}
                    {v.bootstrap ? `Goodness of fit p = ${fmt(v.bootstrap.p, 2)} (${v.bootstrap.plausible ? "power law plausible" : "power law not plausible"}; ${v.bootstrap.note}). ` : ""}
                    Against a lognormal: log-likelihood ratio {fmt(v.lognormal.logLikelihoodRatio, 2)}, p = {fmt(v.lognormal.pTwoSided, 2)} —{" "}
                    {v.lognormal.favours === "neither" ? "neither fits better" : `favours the ${v.lognormal.favours}`}
                    {v.lognormal.note ? ` (${v.lognormal.note})` : ""}.
                  </>
                ) : (
                  <>Observed distribution of {pl.runs} runs; no power law was fitted: {pl.fit.reason}.</>
                )
              }
              legend={
                <>
                  <LegendItem shape="circle" className="text-muted">Observed share of runs at least this size (circles)</LegendItem>
                  {v && <LegendItem shape="line" className="text-accent">Fitted power law (solid)</LegendItem>}
                  {v && <LegendItem shape="dashed" className="text-caution">Fitted lognormal (dashed)</LegendItem>}
                </>
              }
              tableLabel="Table of the distribution and the fits"
              table={
                <>
                  <table>
                    <thead><tr><th scope="col">Run size (ms)</th><th scope="col">P(X ≥ size)</th></tr></thead>
                    <tbody>{pl.ccdf.x.map((x, i) => <tr key={x}><td>{fmt(x, 1)}</td><td>{fmt(pl.ccdf.p[i], 4)}</td></tr>)}</tbody>
                  </table>
                  {v && (
                    <table className="mt-3">
                      <thead><tr><th scope="col">Size (ms)</th><th scope="col">Power law</th><th scope="col">Lognormal</th></tr></thead>
                      <tbody>{v.line.x.map((x, i) => <tr key={x}><td>{fmt(x, 1)}</td><td>{fmt(v.line.powerLaw[i], 4)}</td><td>{fmt(v.line.lognormal[i], 4)}</td></tr>)}</tbody>
                    </table>
                  )}
                </>
              }
            >
              <XYChart series={ccdfSeries} xLabel="Run size (ms, log scale)" yLabel="P(X ≥ size) (log)" logX logY height={260} />
            </ChartFigure>
          )}
        </Measure>
      )}
    </div>
  );
}

export function ResearchPanel({ stayId, start, timeZone }: { stayId: string; start: string; timeZone: string }) {
  const [open, setOpen] = useState(false);
  const { data, error, isLoading } = useSWR(open ? `/api/stays/${stayId}/window/research?start=${encodeURIComponent(start)}` : null, fetchResearch, {
    revalidateOnFocus: false,
    revalidateIfStale: false,
  });
  return (
    <details className="card p-4" onToggle={(e) => setOpen(e.currentTarget.open)}>
      <summary className="cursor-pointer text-lg font-bold">Research panel — research only, never used for flags</summary>
      <div className="mt-4 space-y-4">
        <p className="text-sm text-muted">
          Chaos and power-law measures are unreliable on short, noisy or non-stationary data such as one hour of heart rate. They are shown for
          research, are never stored, and never raise a flag.
        </p>
        <div aria-live="polite" className="text-sm">
          {isLoading && <p>Computing the research measures on the hour around this window…</p>}
          {error && <p className="text-problem">Could not compute the research measures: {error instanceof Error ? error.message : "request failed"}.</p>}
        </div>
        {data && data.window === null && <p className="text-sm">{data.message}</p>}
        {data && data.window !== null && (data.reason ? <p className="text-sm">Not computed: {data.reason}.</p> : <Results r={data} timeZone={timeZone} />)}
      </div>
    </details>
  );
}
