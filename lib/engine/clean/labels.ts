// Per-beat labels and actions shared by the cleaning steps and the window-quality summary.

/**
 * What cleaning concluded about each input interval:
 * - `normal`: kept as measured;
 * - `ectopic`, `long`, `short`, `missed`, `extra`: Lipponen & Tarvainen 2019 classes (`extra` marks both halves
 *   of a falsely split interval);
 * - `out_of_range`: outside the physiological range gate;
 * - `poor_signal`: the device rated the beat below DEVICE_QUALITY_POOR_BELOW or reported lead-off on it (only
 *   when per-beat device quality is supplied);
 * - `percentage`: rejected by the percentage rule only;
 * - `run`: a classifier-flagged interval inside a run of ≥ 3 consecutive abnormal intervals (never bridged:
 *   removed).
 */
export type BeatLabel = "normal" | "ectopic" | "long" | "short" | "missed" | "extra" | "out_of_range" | "poor_signal" | "percentage" | "run";

export const BEAT_LABELS: readonly BeatLabel[] = ["normal", "ectopic", "long", "short", "missed", "extra", "out_of_range", "poor_signal", "percentage", "run"];

/**
 * Device quality (0–1) below which a beat counts as reported poor, for cleaning and for the window summary. Our
 * choice (cp): halfway between the clean range of our simulator (0.85–1) and its motion bursts (< 0.3, DOMAIN §6.6);
 * devices scale quality differently, so a site may set its own.
 */
export const DEVICE_QUALITY_POOR_BELOW = 0.5;

/**
 * What cleaning did with each input interval: `kept` as measured; `interpolated` (value replaced from the
 * neighbouring normal intervals); `split` (a missed beat: one interval became two halves); `merged` (a false
 * detection: two intervals became one); `removed`.
 */
export type BeatAction = "kept" | "interpolated" | "split" | "merged" | "removed";

export const BEAT_ACTIONS: readonly BeatAction[] = ["kept", "interpolated", "split", "merged", "removed"];
