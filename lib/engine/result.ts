// The shape every method returns: a value, or null with a reason — never a silent NaN or 0 — plus the parameters
// and algorithm version that produced it, so a stored value can always be traced and reproduced.
import { ALGORITHM_VERSION } from "./version";

export type ParamValue = number | string | boolean | null | readonly number[];
export type Params = Readonly<Record<string, ParamValue>>;

export interface Measured<V> {
  /** The index, or null when it is undefined for this input (see `reason`). */
  value: V | null;
  /** Why `value` is null; null when it is defined. */
  reason: string | null;
  /** Method identifier, e.g. "sampen". */
  method: string;
  params: Params;
  version: string;
  /** Research-only measures carry `research: true` and may never drive a flag. */
  research?: true;
}

export function measured<V>(method: string, params: Params, value: V): Measured<V> {
  return { value, reason: null, method, params, version: ALGORITHM_VERSION };
}

export function notDefined<V>(method: string, params: Params, reason: string): Measured<V> {
  return { value: null, reason, method, params, version: ALGORITHM_VERSION };
}
