// Time-domain indices (Task Force 1996). One method per file; this module gathers them for the callers.
export { meanNN } from "./mean-nn";
export { heartRate } from "./heart-rate";
export { sdnn, SDNN_DEFAULTS } from "./sdnn";
export { rmssd } from "./rmssd";
export { sdsd, SDSD_DEFAULTS } from "./sdsd";
export { nn50, NN50_DEFAULTS } from "./nn50";
export { pnn50, PNN50_DEFAULTS } from "./pnn50";
export { triangularIndex, TRIANGULAR_INDEX_DEFAULTS } from "./triangular-index";
export { sdann, SDANN_DEFAULTS } from "./sdann";
export { sdnnIndex, SDNN_INDEX_DEFAULTS } from "./sdnn-index";
