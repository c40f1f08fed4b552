// One index of the window: its stored value with unit and change from the patient's baseline, a plain explanation
// with its source, and — one click away — how it was computed: method, parameters, algorithm version, and the reason
// when there is no value.
import type { IndexExplanation } from "@/lib/review/index-explanations";
import type { IndexValueDTO } from "@/lib/review/window-detail";
import { fmt } from "./chart-kit";

/** Decimal places shown per index (its resolution is finer than any clinical use of these digits). */
const DIGITS: Record<string, number> = {
  mean_nn: 0, hr: 0, sdnn: 1, rmssd: 1, sdsd: 1, nn50: 0, pnn50: 1, sd1: 1, sd2: 1, sd1_sd2: 2, sampen: 2, dfa_alpha1: 2,
  vlf: 0, lf: 0, hf: 0, lf_hf: 2, lf_nu: 1, hf_nu: 1, lf_peak_hz: 3, hf_peak_hz: 3,
  mse_ci: 2, mse_slope_short: 3, mse_slope_long: 3, dfa_alpha2: 2, mfdfa_width: 2, apen: 2,
};

function paramText(v: unknown): string {
  if (Array.isArray(v)) return v.join(", ");
  if (v !== null && typeof v === "object") return Object.entries(v).map(([k, x]) => `${k}: ${paramText(x)}`).join("; ");
  return String(v);
}

export function ValueCard({
  value,
  explanation,
  documentParams,
  limited,
}: {
  value: IndexValueDTO;
  explanation: IndexExplanation;
  /** The method's section of the stored parameter document, shown when the value could not be recomputed. */
  documentParams: unknown;
  limited: boolean;
}) {
  const digits = DIGITS[value.key] ?? 2;
  const params = value.params ?? (documentParams && typeof documentParams === "object" ? (documentParams as Record<string, unknown>) : null);
  const delta = value.baselineDelta;
  return (
    <div className="card flex flex-col gap-2 p-3">
      <dt className="text-sm font-bold text-muted">{explanation.label}</dt>
      <dd className="flex flex-wrap items-baseline gap-x-2">
        {value.value === null ? (
          <span className="text-lg text-muted">
            <span aria-hidden="true">—</span>
            <span className="sr-only">No value</span>
          </span>
        ) : (
          <span className={`text-xl font-bold ${limited ? "text-muted" : "text-ink"}`}>
            {fmt(value.value, digits)}
            {explanation.unit && <span className="ml-1 text-sm font-normal">{explanation.unit}</span>}
          </span>
        )}
        {limited && value.value !== null && <span className="rounded border border-dashed border-line px-1 text-xs text-muted">limited quality</span>}
        {delta !== null && value.value !== null && (
          <span className="text-sm text-muted">
            {delta >= 0 ? "+" : "−"}
            {fmt(Math.abs(delta), digits)} vs baseline
          </span>
        )}
      </dd>
      <dd className="text-sm text-muted">
        {explanation.explanation} <cite className="not-italic text-quiet">{explanation.citation}</cite>
      </dd>
      <dd>
        <details className="text-sm">
          <summary className="cursor-pointer text-accent">How this was computed</summary>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
            {value.reason && (
              <>
                <dt className="text-muted">Why no value</dt>
                <dd>{value.reason}</dd>
              </>
            )}
            <dt className="text-muted">Method</dt>
            <dd className="font-mono">{value.method}</dd>
            <dt className="text-muted">Algorithm version</dt>
            <dd className="font-mono">{value.version}</dd>
            <dt className="text-muted">Parameters</dt>
            <dd>
              {params ? (
                <ul className="font-mono text-xs">
                  {Object.entries(params).map(([k, v]) => (
                    <li key={k}>
                      {k}: {paramText(v)}
                    </li>
                  ))}
                </ul>
              ) : (
                "none (the method has no options)"
              )}
            </dd>
            {value.value !== null && value.recomputed !== null && (
              <>
                <dt className="text-muted">Recomputed now</dt>
                <dd>{fmt(value.recomputed, digits + 2)}</dd>
              </>
            )}
          </dl>
        </details>
      </dd>
    </div>
  );
}
