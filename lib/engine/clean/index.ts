// Beat cleaning (RR → NN) and per-window signal quality, DOMAIN §2.1. `cleanBeats` runs the whole chain; the steps
// are exported for callers that need one of them (e.g. the range gate alone for a validation run).
export { cleanBeats, CLEAN_DEFAULTS, type CleanOptions, type CleanInput, type CleanedBeats, type CleanCounts, type Detector } from "./clean-beats";
export { rangeGate, RANGE_GATE_PRESETS, RANGE_GATE_DEFAULTS, type Population, type RangeGateResult } from "./range-gate";
export { percentageRule, PERCENTAGE_RULE_DEFAULTS, type PercentageRuleOptions, type PercentageVariant } from "./percentage-rule";
export { lipponenTarvainen, LIPPONEN_TARVAINEN_DEFAULTS, type LipponenTarvainenOptions, type LtClassification, type LtLabel } from "./lipponen-tarvainen";
export { correctBeats, CORRECTION_DEFAULTS, type CorrectionMode, type CorrectedBeats, type EditEntry } from "./correct-beats";
export { windowQuality, QUALITY_THRESHOLDS, type QualityThresholds, type WindowQuality, type QualityGrade } from "./window-quality";
export { BEAT_LABELS, BEAT_ACTIONS, DEVICE_QUALITY_POOR_BELOW, type BeatLabel, type BeatAction } from "./labels";
