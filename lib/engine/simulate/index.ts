// Synthetic beat generators (DOMAIN §6), for tests, the benchmark and the device simulator. Generators make one
// rhythm; modifiers add ectopy, artefacts and gaps; quantiseBeats applies the device clock; concatSeries joins
// episodes. Typical chain: simulateHealthySleep → addEctopy → addArtefacts → addDropouts → quantiseBeats.
export type { SimulatedBeats, SimulatedGap, SimulationStep, TruthLabel, DeviceBeatType, RhythmLabel } from "./types";
export { simulateHealthySleep, HEALTHY_SLEEP_DEFAULTS, type HealthySleepOptions } from "./healthy-sleep";
export { simulateComplexityLoss, complexityLossLambda, COMPLEXITY_LOSS_DEFAULTS, COMPLEXITY_LOSS_VARIANTS, type ComplexityLossOptions } from "./complexity-loss";
export { simulateAfLike, AF_LIKE_DEFAULTS, type AfLikeOptions } from "./af-like";
export { simulatePaced, PACED_DEFAULTS, type PacedOptions } from "./paced";
export { simulateNicu, NICU_DEFAULTS, type NicuOptions, type Deceleration } from "./nicu";
export { addEctopy, ECTOPY_DEFAULTS, type EctopyOptions } from "./ectopy";
export { addArtefacts, ARTEFACT_DEFAULTS, type ArtefactOptions } from "./artefacts";
export { addDropouts, DROPOUT_DEFAULTS, type DropoutOptions } from "./dropouts";
export { quantiseBeats, DEVICE_RESOLUTIONS_MS } from "./quantise";
export { concatSeries } from "./concat";
export { powerLawNoise, powerLawNoiseLevels } from "./power-law-noise";
